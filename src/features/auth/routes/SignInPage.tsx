import { Link, Navigate, useLocation, useNavigate } from 'react-router';
import { Loading } from '../../../ui/States';
import { useMe } from '../../../lib/currentUser';
import { AuthLayout } from '../components/AuthLayout';
import { SignInForm } from '../components/SignInForm';
import { redirectTarget } from './redirectTarget';

export function SignInPage() {
  const me = useMe();
  const location = useLocation();
  const navigate = useNavigate();
  const target = redirectTarget(location);
  const notice = (location.state as { notice?: string } | null)?.notice;

  if (me.isPending) return <Loading />;
  if (me.data) return <Navigate to={target} replace />;

  return (
    <AuthLayout
      title="Sign in"
      lead={notice ?? 'Vacuum runs, scaling studies and causal sets of your team.'}
      footer={
        <>
          New here?{' '}
          <Link to="/signup" className="text-accent hover:underline">
            Create an account
          </Link>
        </>
      }
    >
      <SignInForm onSignedIn={() => navigate(target, { replace: true })} />
    </AuthLayout>
  );
}
