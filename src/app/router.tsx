import { createBrowserRouter, Navigate } from 'react-router';
import { AccountPage } from '../features/account/routes/AccountPage';
import { ApiDocsPage } from '../features/apiDocs/routes/ApiDocsPage';
import { CausalSetPage } from '../features/causalSets/routes/CausalSetPage';
import { CausalSetsPage } from '../features/causalSets/routes/CausalSetsPage';
import { ImportCausalSetPage } from '../features/causalSets/routes/ImportCausalSetPage';
import { CutRulesPage } from '../features/cutRules/routes/CutRulesPage';
import { ComparePage } from '../features/runs/routes/ComparePage';
import { NewRunPage } from '../features/runs/routes/NewRunPage';
import { RunPage } from '../features/runs/routes/RunPage';
import { RunsPage } from '../features/runs/routes/RunsPage';
import { NewStudyPage } from '../features/studies/routes/NewStudyPage';
import { StudiesPage } from '../features/studies/routes/StudiesPage';
import { StudyPage } from '../features/studies/routes/StudyPage';
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
  // Public, like /api/openapi.json it reads.
  { path: '/api-docs', element: <ApiDocsPage /> },
  {
    element: <RequireAuth />,
    children: [
      {
        element: <AppShell />,
        children: [
          { index: true, element: <Navigate to="/runs" replace /> },
          { path: '/runs', element: <RunsPage /> },
          { path: '/runs/new', element: <NewRunPage /> },
          { path: '/runs/compare', element: <ComparePage /> },
          { path: '/runs/:runId', element: <RunPage /> },
          { path: '/studies', element: <StudiesPage /> },
          { path: '/studies/new', element: <NewStudyPage /> },
          { path: '/studies/:studyId', element: <StudyPage /> },
          { path: '/causal-sets', element: <CausalSetsPage /> },
          { path: '/causal-sets/import', element: <ImportCausalSetPage /> },
          { path: '/causal-sets/:causalSetId', element: <CausalSetPage /> },
          { path: '/cut-rules', element: <CutRulesPage /> },
          { path: '/team', element: <TeamPage /> },
          { path: '/outbox', element: <OutboxPage /> },
          { path: '/account', element: <AccountPage /> },
          { path: '*', element: <NotFoundPage /> },
        ],
      },
    ],
  },
]);
