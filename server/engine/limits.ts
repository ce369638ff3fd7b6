import { backendSelection } from './linalg';
import type { BackendName } from './linalg/backend';
import { EngineInputError } from './errors';

/**
 * Largest N the dense pipeline accepts, per backend. It holds about 7 N × N float64 matrices at once
 * (K, Δ, ΔᵀΔ, its eigenvectors, the solver's working copy, products with the kept basis; LAPACK's
 * dsyevd adds about 2 N² of workspace): 7 × 8 × N² bytes is 0.5 GB at N = 3000 and 2.0 GB at N = 6000
 * (measured peak resident set: 0.32 GB at N = 2000, 0.96 GB at N = 4000 on native).
 * - ml-matrix: 3000 — its pure-JavaScript eigensolver already takes tens of minutes there.
 * - native (LAPACK dsyevd on OpenBLAS, N³ growth from ≈ 6.5 s at N = 4000 on two free cores): 6000,
 *   about 25 s for the eigendecomposition and under a minute for a whole run, ≈ 2–3 GB of memory;
 *   N = 8000 would need ≈ 5 GB per running job, too much beside other jobs on a team server.
 */
export const DENSE_SIZE_LIMITS: Readonly<Record<BackendName, number>> = { native: 6000, 'ml-matrix': 3000 };

export function denseSizeLimit(backend: BackendName = backendSelection().name): number {
  return DENSE_SIZE_LIMITS[backend];
}

const autoDenseLimit = denseSizeLimit();

/** The limit for runs on this process's automatic backend (native when its addon loads). */
export const DENSE_SIZE_LIMIT = {
  maxN: autoDenseLimit,
  matricesHeld: 7,
  backend: backendSelection().name,
  reason: `the dense pipeline holds about 7 N×N float64 matrices at once (≈${((7 * 8 * autoDenseLimit ** 2) / 1e9).toFixed(1)} GB at N = ${autoDenseLimit})`,
} as const;

export function denseMemoryBytes(n: number): number {
  return DENSE_SIZE_LIMIT.matricesHeld * 8 * n * n;
}

/** Throws EngineInputError when N exceeds the dense limit. */
export function checkDenseSize(n: number, maxN: number = DENSE_SIZE_LIMIT.maxN): void {
  if (n > maxN) {
    throw new EngineInputError(
      `N = ${n} exceeds the dense limit of ${maxN} elements: ${DENSE_SIZE_LIMIT.reason}; it would need about ${(denseMemoryBytes(n) / 2 ** 30).toFixed(1)} GB`,
    );
  }
  if (n < 2) throw new EngineInputError(`a causal set needs at least 2 elements, got ${n}`);
}
