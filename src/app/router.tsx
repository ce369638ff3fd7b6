import { lazy, Suspense, type ComponentType } from 'react';
import { Navigate, useRoutes, type RouteObject } from 'react-router';
import { NotFoundPage } from './NotFoundPage';
import { PageBoundary, PageLoading } from './PageLoading';
import { RequireAuth } from './RequireAuth';

/**
 * A page as a lazy component: its module (and whatever only it imports) is a chunk of its own, fetched
 * when the page is first shown, so the sign-in page loads neither the runs, studies and plots nor the
 * signed-in shell. `load` must be a literal `import('…')` for the bundler to split there.
 */
function lazyPage<M>(load: () => Promise<M>, name: keyof M) {
  return lazy(async () => ({ default: (await load())[name] as ComponentType }));
}

const AppShell = lazyPage(() => import('./AppShell'), 'AppShell');
const SignInPage = lazyPage(() => import('../features/auth/routes/SignInPage'), 'SignInPage');
const SignUpPage = lazyPage(() => import('../features/auth/routes/SignUpPage'), 'SignUpPage');
const ResetRequestPage = lazyPage(() => import('../features/auth/routes/ResetRequestPage'), 'ResetRequestPage');
const ResetConfirmPage = lazyPage(() => import('../features/auth/routes/ResetConfirmPage'), 'ResetConfirmPage');
const AcceptInvitationPage = lazyPage(() => import('../features/auth/routes/AcceptInvitationPage'), 'AcceptInvitationPage');
const ApiDocsPage = lazyPage(() => import('../features/apiDocs/routes/ApiDocsPage'), 'ApiDocsPage');
const RunsPage = lazyPage(() => import('../features/runs/routes/RunsPage'), 'RunsPage');
const NewRunPage = lazyPage(() => import('../features/runs/routes/NewRunPage'), 'NewRunPage');
const ComparePage = lazyPage(() => import('../features/runs/routes/ComparePage'), 'ComparePage');
const RunPage = lazyPage(() => import('../features/runs/routes/RunPage'), 'RunPage');
const StudiesPage = lazyPage(() => import('../features/studies/routes/StudiesPage'), 'StudiesPage');
const NewStudyPage = lazyPage(() => import('../features/studies/routes/NewStudyPage'), 'NewStudyPage');
const StudyPage = lazyPage(() => import('../features/studies/routes/StudyPage'), 'StudyPage');
const CausalSetsPage = lazyPage(() => import('../features/causalSets/routes/CausalSetsPage'), 'CausalSetsPage');
const ImportCausalSetPage = lazyPage(() => import('../features/causalSets/routes/ImportCausalSetPage'), 'ImportCausalSetPage');
const CausalSetPage = lazyPage(() => import('../features/causalSets/routes/CausalSetPage'), 'CausalSetPage');
const CutRulesPage = lazyPage(() => import('../features/cutRules/routes/CutRulesPage'), 'CutRulesPage');
const TeamPage = lazyPage(() => import('../features/team/routes/TeamPage'), 'TeamPage');
const OutboxPage = lazyPage(() => import('../features/outbox/routes/OutboxPage'), 'OutboxPage');
const AccountPage = lazyPage(() => import('../features/account/routes/AccountPage'), 'AccountPage');

export const routes: RouteObject[] = [
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
];

/**
 * The pages, in React Router's declarative mode: the data router (loaders, actions) would add about
 * 50 KB to every first load and no page uses it. Navigations run as transitions, so the current page
 * stays on screen while the next one's chunk arrives; the fallback shows only on a first load.
 */
export function AppRoutes() {
  const element = useRoutes(routes);
  return (
    <PageBoundary>
      <Suspense fallback={<PageLoading />}>{element}</Suspense>
    </PageBoundary>
  );
}
