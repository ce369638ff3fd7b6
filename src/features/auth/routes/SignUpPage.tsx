import { Link, Navigate, useNavigate } from 'react-router';
import { Loading } from '../../../ui/States';
import { useMe } from '../../../lib/currentUser';
import { AuthLayout } from '../components/AuthLayout';
import { SignUpForm } from '../components/SignUpForm';

export function SignUpPage() {
  const me = useMe();
  const navigate = useNavigate();

  if (me.isPending) return <Loading />;
  if (me.data) return <Navigate to="/" replace />;

  return (
    <AuthLayout
      title="Create an account"
      lead="A new account starts with a team of its own. Invited by a colleague? Open the link in their e-mail instead."
      footer={
        <>
          Already have an account?{' '}
          <Link to="/signin" className="text-accent hover:underline">
            Sign in
          </Link>
        </>
      }
    >
      <SignUpForm onSignedUp={() => navigate('/team', { replace: true })} />
    </AuthLayout>
  );
}
