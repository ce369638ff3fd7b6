import { createBrowserRouter, Navigate } from 'react-router';
import { AccountPage } from '../features/account/routes/AccountPage';
import { ResetConfirmPage } from '../features/auth/routes/ResetConfirmPage';
import { ResetRequestPage } from '../features/auth/routes/ResetRequestPage';
import { SignInPage } from '../features/auth/routes/SignInPage';
import { SignUpPage } from '../features/auth/routes/SignUpPage';
import { AcceptInvitationPage } from '../features/invitations/routes/AcceptInvitationPage';
import { OutboxPage } from '../features/outbox/routes/OutboxPage';
import { TeamPage } from '../features/team/routes/TeamPage';
import { AppShell } from './AppShell';
import { NotFoundPage } from './NotFoundPage';
import { RequireAuth } from './RequireAuth';

export const router = createBrowserRouter([
  { path: '/signin', element: <SignInPage /> },
  { path: '/signup', element: <SignUpPage /> },
  { path: '/reset-password', element: <ResetRequestPage /> },
  { path: '/reset-password/:token', element: <ResetConfirmPage /> },
  // Public: the preview is shown before signing in or up.
  { path: '/invite/:token', element: <AcceptInvitationPage /> },
  {
    element: <RequireAuth />,
    children: [
      {
        element: <AppShell />,
        children: [
          // The start page is the team until runs exist (issue 4 makes it /runs).
          { index: true, element: <Navigate to="/team" replace /> },
          { path: '/team', element: <TeamPage /> },
          { path: '/outbox', element: <OutboxPage /> },
          { path: '/account', element: <AccountPage /> },
          { path: '*', element: <NotFoundPage /> },
        ],
      },
    ],
  },
]);
