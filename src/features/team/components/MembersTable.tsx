import { useState } from 'react';
import { roles, type Role } from '@shared/roles';
import type { Member } from '@shared/teams';
import { formatDate, roleLabels } from '../../../lib/format';
import { Button } from '../../../ui/Button';
import { useChangeRole, useRemoveMember } from '../api/team';

interface MembersTableProps {
  members: Member[];
  currentUserId: string;
  canManage: boolean;
}

export function MembersTable({ members, currentUserId, canManage }: MembersTableProps) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" aria-label="Members">
        <thead>
          <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
            <th className="py-2 pr-4 font-normal">Name</th>
            <th className="py-2 pr-4 font-normal">E-mail</th>
            <th className="py-2 pr-4 font-normal">Role</th>
            <th className="py-2 pr-4 text-right font-normal">Joined</th>
            {canManage && <th className="py-2 font-normal"><span className="sr-only">Actions</span></th>}
          </tr>
        </thead>
        <tbody>
          {members.map((member) => (
            <MemberRow key={member.userId} member={member} isSelf={member.userId === currentUserId} canManage={canManage} />
          ))}
        </tbody>
      </table>
    </div>
  );
}

function MemberRow({ member, isSelf, canManage }: { member: Member; isSelf: boolean; canManage: boolean }) {
  const changeRole = useChangeRole();
  const removeMember = useRemoveMember();
  const [confirmingRemoval, setConfirmingRemoval] = useState(false);
  const error = changeRole.error ?? removeMember.error;

  return (
    <>
      <tr className="border-b border-rule align-baseline" data-testid={`member-${member.email}`}>
        <td className="py-2.5 pr-4">
          {member.name}
          {isSelf && <span className="ml-2 text-xs text-ink-faint">you</span>}
        </td>
        <td className="py-2.5 pr-4 text-ink-soft">{member.email}</td>
        <td className="py-2.5 pr-4">
          {canManage ? (
            <select
              aria-label={`Role of ${member.name}`}
              className="min-w-32 cursor-pointer border-0 border-b border-transparent bg-transparent py-0.5 pr-1 hover:border-rule focus:border-accent focus:outline-none"
              value={member.role}
              disabled={changeRole.isPending}
              onChange={(e) => changeRole.mutate({ userId: member.userId, role: e.target.value as Role })}
            >
              {roles.map((role) => (
                <option key={role} value={role}>
                  {roleLabels[role]}
                </option>
              ))}
            </select>
          ) : (
            roleLabels[member.role]
          )}
        </td>
        <td className="figures py-2.5 pr-4 text-right text-ink-soft">{formatDate(member.joinedAt)}</td>
        {canManage && (
          <td className="py-2.5 text-right whitespace-nowrap">
            {confirmingRemoval ? (
              <span className="inline-flex items-baseline gap-2">
                <span className="text-xs text-ink-soft">{isSelf ? 'Leave the team?' : `Remove ${member.name}?`}</span>
                <Button
                  variant="danger"
                  busy={removeMember.isPending}
                  onClick={() => removeMember.mutate(member.userId, { onSettled: () => setConfirmingRemoval(false) })}
                >
                  {isSelf ? 'Leave' : 'Remove'}
                </Button>
                <Button variant="quiet" onClick={() => setConfirmingRemoval(false)}>
                  Keep
                </Button>
              </span>
            ) : (
              <Button variant="quiet" className="text-ink-soft" onClick={() => setConfirmingRemoval(true)}>
                {isSelf ? 'Leave' : 'Remove'}
              </Button>
            )}
          </td>
        )}
      </tr>
      {error && (
        <tr>
          <td colSpan={canManage ? 5 : 4} className="py-1.5 text-xs text-danger" role="alert">
            {error.message}
          </td>
        </tr>
      )}
    </>
  );
}
