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

/** Checks that the engine estimates with random probes for an untruncated state of large N. */
const probedChecks = new Set(['positiveNegativeOverlap', 'basisOrthonormalityError']);

/** How many random probes stand behind the run's estimated checks; 0 when every check is exact. */
export function probedCheckCount(diagnostics: RunResult['diagnostics']): number {
  return diagnostics.checkMethod === 'probe' && typeof diagnostics.probeCount === 'number' ? diagnostics.probeCount : 0;
}

/** The note beside one check of the diagnostics table: how the figure was obtained when not exactly. */
export function diagnosticNote(key: string, note: string, smallestEigenvalueMethod: unknown, probes: number): string {
  if (key === 'minEigenvalueW' && smallestEigenvalueMethod === 'lower-bound') return 'a rigorous lower bound; ≥ 0 up to rounding';
  if (key === 'minEigenvalueW' && smallestEigenvalueMethod === 'probe-bound') {
    return `a lower bound estimated from ${probes} random probes; ≥ 0 up to rounding`;
  }
  if (probes > 0 && probedChecks.has(key)) return `${note}; estimated from ${probes} random probes (within about 25 %)`;
  return note;
}
