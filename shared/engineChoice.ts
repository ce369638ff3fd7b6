/**
 * Which engine serves a vacuum request: the documented rule, shared by the server (validation and
 * computeVacuum) and the run form, so both check N against the limit of the same engine.
 */
import type { TruncationRule } from './vacuum';

export type EngineName = 'dense' | 'structured';
export type EngineRequest = EngineName | 'auto';
export const engineRequests = ['auto', 'dense', 'structured'] as const;

/**
 * Largest N the structured engine accepts in 2D. Its memory is the factored state (2kN doubles,
 * k ≈ 2√N pairs under the √N/(4π) cut: ≈ 1 GB at 100 000) plus the Lanczos basis (≈ 3.7kN doubles,
 * released before the state is used), within 4 GiB at N = 100 000.
 */
export const STRUCTURED_MAX_N_2D = 100_000;

/** The truncation rules the structured engine serves: a cut known before the spectrum is. */
export const STRUCTURED_TRUNCATIONS = ['sqrtN', 'lambda', 'modes'] as const;
export const STRUCTURED_DIMENSIONS = [2] as const;
export const STRUCTURED_MEMORY_REASON =
  'the structured engine keeps the truncated state as N × 2k factors (k ≈ 2√N pairs above the √N/(4π) cut) and a Lanczos basis of a few k vectors, never an N×N matrix';

/**
 * Below this N the dense engine is chosen by 'auto' even when the structured one could serve: it is
 * fast there (seconds with LAPACK), computes the whole spectrum, and is the reference the structured
 * engine is tested against.
 */
export const AUTO_STRUCTURED_FROM = 1000;

export interface EngineChoiceInput {
  N: number;
  dimension: 2 | 4;
  truncation: TruncationRule;
  requested?: EngineRequest;
  /** the dense engine's size limit */
  denseMaxN: number;
  /** x is periodic (cylinder) */
  periodic?: boolean;
}

export interface EngineChoice {
  engine: EngineName;
  /** one sentence: why this engine */
  reason: string;
}

/**
 * Why the structured engine cannot serve a request, or null when it can. It only finds the modes above
 * a cut, so it needs a truncation that is known before the spectrum is (sqrtN, lambda:X, modes:K);
 * 'none' needs every mode and 'knee' needs the spectrum past the knee. Only the 2D operator exists.
 */
export function structuredUnsupportedReason(dimension: 2 | 4, truncation: TruncationRule, periodic = false): string | null {
  if (periodic) return 'the structured engine has no periodic (cylinder) order; the dense engine handles it';
  // The 4D operator exists (server/engine/structured/links4d.ts, checked against the dense one), but the
  // 4D spectrum decays slowly: under the √N/(4π) cut about a third of all pairs lie above it (1851 of
  // 2500 at N = 5000, 421 s of Lanczos against seconds dense), so 4D stays on the dense engine.
  if (dimension !== 2) return 'the structured engine is 2D only: in 4D about a third of the pairs lie above a √N/(4π) cut, where the dense engine is faster';
  if (truncation.rule === 'none') return 'the structured engine computes only the modes above a cut; truncation "none" needs all of them';
  if (truncation.rule === 'knee') return 'the knee finder needs the spectrum past the knee, which only the dense engine computes';
  return null;
}

/** Largest N an engine accepts for a request (0 when it cannot serve it at all). */
export function maxElements(engine: EngineName, dimension: 2 | 4, truncation: TruncationRule, denseMaxN: number, periodic = false): number {
  if (engine === 'dense') return denseMaxN;
  return structuredUnsupportedReason(dimension, truncation, periodic) === null ? STRUCTURED_MAX_N_2D : 0;
}

/**
 * The documented rule. A forced engine is used if it can serve the request, else the error says why.
 * 'auto': structured when it can serve and N ≥ AUTO_STRUCTURED_FROM (or N is past the dense limit),
 * dense otherwise.
 */
export function chooseEngine(input: EngineChoiceInput): EngineChoice {
  const { N, dimension, truncation, denseMaxN } = input;
  const requested = input.requested ?? 'auto';
  const unsupported = structuredUnsupportedReason(dimension, truncation, input.periodic === true);
  const structuredLimit = `the structured engine accepts at most ${STRUCTURED_MAX_N_2D} elements`;
  if (requested === 'structured') {
    if (unsupported) throw new Error(unsupported);
    if (N > STRUCTURED_MAX_N_2D) throw new Error(`N = ${N} exceeds the structured limit of ${STRUCTURED_MAX_N_2D} elements`);
    return { engine: 'structured', reason: 'forced by the request' };
  }
  if (requested === 'dense') {
    if (N > denseMaxN) throw new Error(`N = ${N} exceeds the dense limit of ${denseMaxN} elements`);
    return { engine: 'dense', reason: 'forced by the request' };
  }
  if (!unsupported && N <= STRUCTURED_MAX_N_2D && (N >= AUTO_STRUCTURED_FROM || N > denseMaxN)) {
    return { engine: 'structured', reason: `2D with a ${truncation.rule} cut and N ≥ ${AUTO_STRUCTURED_FROM}: only the modes above the cut are computed` };
  }
  if (N <= denseMaxN) return { engine: 'dense', reason: unsupported ?? `N < ${AUTO_STRUCTURED_FROM}: the dense engine is fast and exact here` };
  throw new Error(`N = ${N} exceeds the dense limit of ${denseMaxN} elements${unsupported ? ` and ${unsupported}` : `; ${structuredLimit}`}`);
}

/** The rule of chooseEngine in one paragraph, as GET /api/limits states it and the run form shows it. */
export const engineRuleText =
  `Auto picks the structured engine for 2D non-periodic regions with a sqrtN, lambda or modes cut when ` +
  `N ≥ ${AUTO_STRUCTURED_FROM} (or N is above the dense limit), up to ${STRUCTURED_MAX_N_2D} elements; ` +
  `it computes only the modes above the cut. Everything else (truncation none or knee, 4D, the cylinder, ` +
  `a causal set given by its relation only) runs on the dense engine, which holds N×N matrices.`;

/**
 * The size limit that applies to a request under the rule: the structured limit when the structured
 * engine is forced or 'auto' may pick it, the dense limit otherwise; 0 when a forced structured engine
 * cannot serve the request at all (`unsupported` says why).
 */
export function sizeLimitForRequest(input: Omit<EngineChoiceInput, 'N'>): { engine: EngineName; maxN: number; unsupported: string | null } {
  const requested = input.requested ?? 'auto';
  const unsupported = structuredUnsupportedReason(input.dimension, input.truncation, input.periodic === true);
  if (requested === 'dense') return { engine: 'dense', maxN: input.denseMaxN, unsupported: null };
  if (requested === 'structured') return { engine: 'structured', maxN: unsupported ? 0 : STRUCTURED_MAX_N_2D, unsupported };
  if (unsupported) return { engine: 'dense', maxN: input.denseMaxN, unsupported };
  return { engine: 'structured', maxN: Math.max(STRUCTURED_MAX_N_2D, input.denseMaxN), unsupported: null };
}
