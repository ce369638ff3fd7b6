import type { RunResult } from '@shared/runs';

/** The "Engine" row of the settings table: which engine ran and why, then version and backend. */
export function engineRowText(result: Pick<RunResult, 'engine' | 'engineReason' | 'engineVersion' | 'backend'>): string {
  const versions = `${result.engineVersion}, ${result.backend} backend`;
  // runs stored before the structured engine existed say nothing: they all ran dense
  if (!result.engine) return versions;
  return `${result.engine} (${result.engineReason ?? 'no reason recorded'}) · ${versions}`;
}

/**
 * What the spectrum of a structured run holds, or null for a dense run: only the positive eigenvalues
 * above the cut were computed (one more for a modes:K cut), never the rest of the spectrum.
 */
export function structuredSpectrumNote(result: Pick<RunResult, 'engine' | 'eigenvalues' | 'modesKept' | 'N'>): string | null {
  if (result.engine !== 'structured') return null;
  const computed = result.eigenvalues.length;
  return (
    `Structured engine: only the modes above the cut were computed (${computed} positive eigenvalue${computed === 1 ? '' : 's'}, ` +
    `${result.modesKept} kept, of up to ${Math.floor(result.N / 2)}); the spectrum below the cut and the knee are not known for this run.`
  );
}
