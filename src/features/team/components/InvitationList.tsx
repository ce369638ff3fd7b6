import type { Invitation } from '@shared/teams';
import { formatDate, roleLabels } from '../../../lib/format';
import { Button } from '../../../ui/Button';
import { useRevokeInvitation } from '../api/team';

function invitationState(invitation: Invitation, now: number): 'accepted' | 'expired' | 'open' {
  if (invitation.acceptedAt) return 'accepted';
  return new Date(invitation.expiresAt).getTime() <= now ? 'expired' : 'open';
}

const stateLabels = { accepted: 'Accepted', expired: 'Expired', open: 'Waiting' } as const;

export function InvitationList({ invitations }: { invitations: Invitation[] }) {
  const now = Date.now();
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" aria-label="Invitations">
        <thead>
          <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
            <th className="py-2 pr-4 font-normal">E-mail</th>
            <th className="py-2 pr-4 font-normal">Role</th>
            <th className="py-2 pr-4 font-normal">State</th>
            <th className="py-2 pr-4 text-right font-normal">Sent</th>
            <th className="py-2 pr-4 text-right font-normal">Valid until</th>
            <th className="py-2 font-normal"><span className="sr-only">Actions</span></th>
          </tr>
        </thead>
        <tbody>
          {invitations.map((invitation) => (
            <InvitationRow key={invitation.id} invitation={invitation} state={invitationState(invitation, now)} />
          ))}
        </tbody>
      </table>
    </div>
  );
}

function InvitationRow({ invitation, state }: { invitation: Invitation; state: 'accepted' | 'expired' | 'open' }) {
  const revoke = useRevokeInvitation();
  return (
    <>
      <tr className="border-b border-rule align-baseline" data-testid={`invitation-${invitation.email}`}>
        <td className="py-2.5 pr-4">{invitation.email}</td>
        <td className="py-2.5 pr-4">{roleLabels[invitation.role]}</td>
        <td className={`py-2.5 pr-4 ${state === 'open' ? 'text-accent' : 'text-ink-faint'}`}>{stateLabels[state]}</td>
        <td className="figures py-2.5 pr-4 text-right text-ink-soft">{formatDate(invitation.createdAt)}</td>
        <td className="figures py-2.5 pr-4 text-right text-ink-soft">
          {state === 'accepted' && invitation.acceptedAt ? '—' : formatDate(invitation.expiresAt)}
        </td>
        <td className="py-2.5 text-right">
          {state !== 'accepted' && (
            <Button variant="quiet" className="text-ink-soft" busy={revoke.isPending} onClick={() => revoke.mutate(invitation.id)}>
              Revoke
            </Button>
          )}
        </td>
      </tr>
      {revoke.error && (
        <tr>
          <td colSpan={6} className="py-1.5 text-xs text-danger" role="alert">
            {revoke.error.message}
          </td>
        </tr>
      )}
    </>
  );
}
