import type { Permission } from '@shared/roles';

export interface NavigationItem {
  to: string;
  label: string;
  /** Shown only to roles that have this permission in the current team. */
  permission: Permission;
  /** A one-line description, used as the link's title. */
  description: string;
}

/**
 * The main navigation, in order. Only pages that exist are listed.
 */
export const navigation: NavigationItem[] = [
  { to: '/runs', label: 'Runs', permission: 'read', description: 'Vacuum runs: SJ states, spectra and entropies' },
  { to: '/studies', label: 'Studies', permission: 'read', description: 'Scaling studies: entropy over N, sizes, seeds and cut rules, with fits' },
  { to: '/causal-sets', label: 'Causal sets', permission: 'read', description: 'Imported causal sets: coordinates or relations made elsewhere' },
  { to: '/cut-rules', label: 'Cut rules', permission: 'read', description: 'Truncation rules saved for the team' },
  { to: '/team', label: 'Team', permission: 'read', description: 'Members, roles and invitations' },
  { to: '/outbox', label: 'Outbox', permission: 'manageTeam', description: 'E-mail kept by a development server' },
];
