import { useEffect, useRef, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import type { InvitationPreview } from '@shared/teams';
import { isApiError } from '../../../lib/apiClient';
import { roleLabels } from '../../../lib/format';
import { Button } from '../../../ui/Button';
import { FormError } from '../../../ui/Field';
import { ErrorState, Loading } from '../../../ui/States';
import { useMe } from '../../../lib/currentUser';
import { useSignOut } from '../api/session';
import { AuthLayout } from '../components/AuthLayout';
import { SignInForm } from '../components/SignInForm';
import { SignUpForm } from '../components/SignUpForm';
import { useAcceptInvitation, useInvitationPreview } from '../api/invitations';

type Path = 'signin' | 'signup';

export function AcceptInvitationPage() {
  const { token = '' } = useParams();
  const preview = useInvitationPreview(token);
  const me = useMe();
  // Signing in on this page means "accept it": done once the signed-in view takes over.
  const [acceptOnSignIn, setAcceptOnSignIn] = useState(false);

  if (preview.isPending || me.isPending) return <Loading label="Reading the invitation" />;
  if (preview.isError) {
    const missing = isApiError(preview.error, 404);
    return (
      <AuthLayout
        title={missing ? 'Invitation not found' : 'Invitation unavailable'}
        footer={<Link to="/signin" className="text-accent hover:underline">Go to sign in</Link>}
      >
        {missing ? (
          <p className="text-sm">This link does not lead to an invitation. Ask the person who invited you for a new one.</p>
        ) : (
          <ErrorState error={preview.error} onRetry={() => preview.refetch()} />
        )}
      </AuthLayout>
    );
  }

  const invitation = preview.data;
  return (
    <AuthLayout title={`Join ${invitation.teamName}`} lead={<InvitationSummary invitation={invitation} />}>
      {invitation.accepted ? (
        <p className="text-sm">
          This invitation has been accepted.{' '}
          <Link to={me.data ? '/team' : '/signin'} className="text-accent hover:underline">
            {me.data ? 'Open the team' : 'Sign in'}
          </Link>
        </p>
      ) : invitation.expired ? (
        <p className="text-sm">This invitation has expired. Ask {invitation.invitedBy} to send a new one.</p>
      ) : me.data ? (
        <SignedInAccept
          token={token}
          invitation={invitation}
          signedInEmail={me.data.user.email}
          acceptNow={acceptOnSignIn}
        />
      ) : (
        <SignedOutAccept token={token} invitation={invitation} onSignedIn={() => setAcceptOnSignIn(true)} />
      )}
    </AuthLayout>
  );
}

function InvitationSummary({ invitation }: { invitation: InvitationPreview }) {
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
      <dt className="text-ink-faint">Invited by</dt>
      <dd>{invitation.invitedBy}</dd>
      <dt className="text-ink-faint">For</dt>
      <dd>{invitation.email}</dd>
      <dt className="text-ink-faint">Role</dt>
      <dd>{roleLabels[invitation.role]}</dd>
    </dl>
  );
}

interface SignedInAcceptProps {
  token: string;
  invitation: InvitationPreview;
  signedInEmail: string;
  acceptNow: boolean;
}

function SignedInAccept({ token, invitation, signedInEmail, acceptNow }: SignedInAcceptProps) {
  const navigate = useNavigate();
  const accept = useAcceptInvitation(token);
  const signOut = useSignOut();
  const emailMatches = signedInEmail.toLowerCase() === invitation.email.toLowerCase();
  const started = useRef(false);

  function acceptAndOpen() {
    started.current = true;
    accept.mutate(undefined, { onSuccess: () => navigate('/team', { replace: true }) });
  }

  useEffect(() => {
    if (acceptNow && emailMatches && !started.current) acceptAndOpen();
    // Run when the trigger turns on; the ref keeps it to one request.
  }, [acceptNow, emailMatches]);

  if (!emailMatches) {
    return (
      <div className="flex flex-col gap-4 text-sm">
        <p>
          You are signed in as <span className="font-medium">{signedInEmail}</span>, but this invitation is for{' '}
          <span className="font-medium">{invitation.email}</span>.
        </p>
        <div>
          <Button variant="quiet" busy={signOut.isPending} onClick={() => signOut.mutate()}>
            Sign out and continue as {invitation.email}
          </Button>
        </div>
      </div>
    );
  }

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm">
        Signed in as <span className="font-medium">{signedInEmail}</span>.
      </p>
      <FormError message={accept.error?.message} />
      <div>
        <Button busy={accept.isPending} onClick={acceptAndOpen}>
          Accept and join {invitation.teamName}
        </Button>
      </div>
    </div>
  );
}

interface SignedOutAcceptProps {
  token: string;
  invitation: InvitationPreview;
  onSignedIn: () => void;
}

function SignedOutAccept({ token, invitation, onSignedIn }: SignedOutAcceptProps) {
  const [path, setPath] = useState<Path>('signup');
  const navigate = useNavigate();

  const tabClass = (active: boolean) =>
    `pb-2 text-sm border-b-2 ${active ? 'border-accent text-ink' : 'border-transparent text-ink-soft hover:text-ink'}`;

  return (
    <div className="flex flex-col gap-8">
      <div role="tablist" className="flex gap-6 border-b border-rule">
        <button type="button" role="tab" aria-selected={path === 'signup'} className={tabClass(path === 'signup')} onClick={() => setPath('signup')}>
          I am new to Tacet
        </button>
        <button type="button" role="tab" aria-selected={path === 'signin'} className={tabClass(path === 'signin')} onClick={() => setPath('signin')}>
          I have an account
        </button>
      </div>
      {path === 'signup' ? (
        // Sign-up with the token joins the team directly; nothing to accept afterwards.
        <SignUpForm invitation={{ token, email: invitation.email }} onSignedUp={() => navigate('/team', { replace: true })} />
      ) : (
        <SignInForm initialEmail={invitation.email} onSignedIn={onSignedIn} />
      )}
    </div>
  );
}
