import { useSyncExternalStore } from 'react';

/**
 * The team the user is working in, remembered across reloads. The API client sends it as the
 * team header; query keys of team-scoped resources include it, so switching refetches them.
 */
const storageKey = 'tacet.currentTeam';
const listeners = new Set<() => void>();

function readStored(): string | null {
  try {
    return window.localStorage.getItem(storageKey);
  } catch {
    return null;
  }
}

let currentTeamId: string | null = typeof window === 'undefined' ? null : readStored();

export function getCurrentTeamId(): string | null {
  return currentTeamId;
}

export function setCurrentTeamId(teamId: string | null): void {
  if (teamId === currentTeamId) return;
  currentTeamId = teamId;
  try {
    if (teamId) window.localStorage.setItem(storageKey, teamId);
    else window.localStorage.removeItem(storageKey);
  } catch {
    // Private browsing may refuse storage; the choice then lasts for this tab only.
  }
  for (const listener of listeners) listener();
}

function subscribe(listener: () => void): () => void {
  listeners.add(listener);
  const onStorage = (event: StorageEvent) => {
    if (event.key === storageKey) {
      currentTeamId = event.newValue;
      listener();
    }
  };
  window.addEventListener('storage', onStorage);
  return () => {
    listeners.delete(listener);
    window.removeEventListener('storage', onStorage);
  };
}

/** The stored team id (may be stale until checked against the memberships, see useCurrentMembership). */
export function useStoredTeamId(): string | null {
  return useSyncExternalStore(subscribe, getCurrentTeamId, () => null);
}
