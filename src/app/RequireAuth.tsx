import { Navigate, Outlet, useLocation } from 'react-router';
import { ErrorState, Loading } from '../ui/States';
import { useMe } from '../lib/currentUser';

/** Pages behind sign-in: signed-out visitors go to /signin, which sends them back afterwards. */
export function RequireAuth() {
  const me = useMe();
  const location = useLocation();

  if (me.isPending) {
    return (
      <div className="mx-auto max-w-6xl px-6 pt-10">
        <Loading />
      </div>
    );
  }
  if (me.isError) {
    return (
      <div className="mx-auto max-w-6xl px-6 pt-10">
        <ErrorState error={me.error} onRetry={() => me.refetch()} />
      </div>
    );
  }
  if (!me.data) return <Navigate to="/signin" replace state={{ from: location }} />;
  return <Outlet />;
}
