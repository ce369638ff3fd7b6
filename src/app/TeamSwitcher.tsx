import { useQueryClient } from '@tanstack/react-query';
import { setCurrentTeamId } from '../lib/currentTeam';
import { roleLabels } from '../lib/format';
import { useCurrentMembership, useMe } from '../lib/currentUser';

export function TeamSwitcher() {
  const me = useMe();
  const current = useCurrentMembership();
  const queryClient = useQueryClient();
  const memberships = me.data?.memberships ?? [];

  if (!current) return <span className="text-sm text-ink-faint">No team</span>;

  function switchTo(teamId: string) {
    setCurrentTeamId(teamId);
    // Team-scoped keys carry the team id, so the new team's data loads by itself; refresh
    // everything else that may depend on the team header too.
    void queryClient.invalidateQueries({ predicate: (query) => query.queryKey[0] !== 'me' });
  }

  const roleTag = (
    <span className="rounded-sm border border-rule px-1.5 py-px text-[0.6875rem] tracking-wide text-ink-soft uppercase" data-testid="current-role">
      {roleLabels[current.role]}
    </span>
  );

  if (memberships.length === 1) {
    return (
      <div className="flex min-w-0 items-center gap-2 text-sm">
        <span className="truncate" data-testid="current-team">{current.team.name}</span>
        {roleTag}
      </div>
    );
  }

  return (
    <div className="flex min-w-0 items-center gap-2 text-sm">
      <label className="sr-only" htmlFor="team-switcher">
        Team
      </label>
      <select
        id="team-switcher"
        data-testid="current-team"
        value={current.team.id}
        onChange={(e) => switchTo(e.target.value)}
        className="field-sizing-content max-w-[24rem] cursor-pointer truncate border-0 border-b border-rule bg-transparent py-0.5 pr-6 hover:border-ink-faint focus:border-accent focus:outline-none"
      >
        {memberships.map((membership) => (
          <option key={membership.team.id} value={membership.team.id}>
            {membership.team.name} — {roleLabels[membership.role]}
          </option>
        ))}
      </select>
      {roleTag}
    </div>
  );
}
