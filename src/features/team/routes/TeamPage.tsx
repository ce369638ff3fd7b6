import { useState } from 'react';
import { roleLabels } from '../../../lib/format';
import { Button } from '../../../ui/Button';
import { PageHeader, Section } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useMe } from '../../../lib/currentUser';
import { useCan } from '../../../lib/permissions';
import { useInvitations, useMembers, useTeam } from '../api/team';
import { InvitationList } from '../components/InvitationList';
import { InviteForm } from '../components/InviteForm';
import { MembersTable } from '../components/MembersTable';
import { RenameTeamForm } from '../components/RenameTeamForm';
import { RoleLegend } from '../components/RoleLegend';

export function TeamPage() {
  const me = useMe();
  const team = useTeam();
  const members = useMembers();
  const canManage = useCan('manageTeam');
  const [renaming, setRenaming] = useState(false);

  if (team.isPending) return <Loading label="Loading the team" />;
  if (team.isError) return <ErrorState error={team.error} onRetry={() => team.refetch()} />;

  return (
    <>
      {renaming ? (
        <div className="mb-8 border-b border-rule pb-4">
          <RenameTeamForm currentName={team.data.name} onDone={() => setRenaming(false)} />
        </div>
      ) : (
        <PageHeader
          title={team.data.name}
          context={
            <>
              You are {team.data.role === 'owner' ? 'an' : 'a'}{' '}
              <span className="text-ink">{roleLabels[team.data.role].toLowerCase()}</span> of this team.
              {!canManage && ' Only owners change members, roles and invitations.'}
            </>
          }
          actions={
            canManage && (
              <Button variant="quiet" onClick={() => setRenaming(true)}>
                Rename team
              </Button>
            )
          }
        />
      )}

      <Section title="Members" aside={members.data && <span className="figures">{members.data.length}</span>}>
        {members.isPending ? (
          <Loading label="Loading members" />
        ) : members.isError ? (
          <ErrorState error={members.error} onRetry={() => members.refetch()} />
        ) : (
          <MembersTable members={members.data} currentUserId={me.data?.user.id ?? ''} canManage={canManage} />
        )}
      </Section>

      {canManage && <InvitationsSection />}

      <Section title="Roles">
        <RoleLegend />
      </Section>
    </>
  );
}

function InvitationsSection() {
  const invitations = useInvitations();
  return (
    <Section title="Invitations">
      <div className="mb-8">
        <InviteForm />
      </div>
      {invitations.isPending ? (
        <Loading label="Loading invitations" />
      ) : invitations.isError ? (
        <ErrorState error={invitations.error} onRetry={() => invitations.refetch()} />
      ) : invitations.data.length === 0 ? (
        <Empty>No invitations yet. Invite a colleague by e-mail above; they choose a password when they accept.</Empty>
      ) : (
        <InvitationList invitations={invitations.data} />
      )}
    </Section>
  );
}
