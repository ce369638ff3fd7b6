import type { RunSummary } from '@shared/runs';

/** The compare page overlays 2 to this many runs. */
export const maxCompared = 6;

/** The run ids of `?ids=a,b,c`: trimmed, without repeats, at most `maxCompared`. */
export function parseCompareIds(text: string | null): string[] {
  if (!text) return [];
  return Array.from(new Set(text.split(',').map((id) => id.trim()).filter(Boolean))).slice(0, maxCompared);
}

/** A run's title, or its short id when it has none. */
export function runLabel(run: Pick<RunSummary, 'id' | 'title'>): string {
  return run.title?.trim() || `Run ${run.id.slice(0, 8)}`;
}
