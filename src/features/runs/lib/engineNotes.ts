import { AUTO_STRUCTURED_FROM, chooseEngine, sizeLimitForRequest } from '@shared/engineChoice';
import { isPeriodicRegionKind, regionDimension } from '@shared/regions';
import type { TruncationRule } from '@shared/vacuum';
import type { ReanalyseFormValues } from './reanalyseForm';
import type { PickedCausalSet, RunFormValues } from './runForm';

/**
 * Largest N the server's dense engine accepts, per linear-algebra backend (server/engine
 * DENSE_SIZE_LIMITS; a unit test keeps the two equal). Until GET /api/limits says which backend the
 * server runs, the form refuses only what no server takes and states both; the server's 422 has the
 * last word.
 */
export const denseLimits = { native: 6000, 'ml-matrix': 3000 } as const;
export const denseLimitN = Math.max(...Object.values(denseLimits));

export const capitalise = (text: string) => text.charAt(0).toUpperCase() + text.slice(1);
/** The engine choice reads only the kind of rule, never its number, so a half-typed cut still tells. */
const ruleOnly = (v: RunFormValues) => ({ rule: v.truncation.kind }) as TruncationRule;

/**
 * The engine the shared rule (shared/engineChoice.ts) would consider for the form's settings and the
 * size limit that follows: the structured limit for 2D non-periodic regions with a sqrtN, lambda or
 * modes cut (unless dense is forced), the dense limit `denseMaxN` otherwise.
 */
export function engineLimitOf(v: RunFormValues, denseMaxN: number = denseLimitN): ReturnType<typeof sizeLimitForRequest> {
  return sizeLimitForRequest({
    dimension: regionDimension(v.regionKind),
    truncation: ruleOnly(v),
    requested: v.engine,
    denseMaxN,
    periodic: isPeriodicRegionKind(v.regionKind),
  });
}

/** The hint beside N: the range the current settings allow, and which engine's limit that is. */
export function sizeHint(v: RunFormValues, denseMaxN: number = denseLimitN): string {
  const limit = engineLimitOf(v, denseMaxN);
  if (limit.maxN === 0) return `The structured engine cannot take these settings; the dense one takes 2 to ${denseMaxN}.`;
  if (limit.engine === 'dense') return `2 to ${limit.maxN} (dense engine${v.engine === 'dense' ? ', forced' : ''}).`;
  const forced = v.engine === 'structured' ? 'forced' : `auto uses it from N = ${AUTO_STRUCTURED_FROM}`;
  return `2 to ${limit.maxN} (structured engine, ${forced}; the dense one takes up to ${denseMaxN}).`;
}

/**
 * What the engine choice does with the settings as typed, in one sentence for the form (the rule of
 * shared/engineChoice.ts, so the run page says the same afterwards), or why the settings cannot run.
 */
export function engineNote(v: RunFormValues, denseMaxN: number = denseLimitN, picked: PickedCausalSet | null = null): string {
  if (v.source === 'imported') {
    if (picked?.kind === 'relations') return relationListEngineNote;
    return 'The server applies the same rule to the set’s own region and size; the run page says which engine ran.';
  }
  const N = Number(v.count);
  if (!Number.isInteger(N) || N < 2 || (v.process === 'poisson' && v.sizeBy === 'density')) {
    return `The engine follows from N: structured for 2D cuts from N = ${AUTO_STRUCTURED_FROM}, dense otherwise.`;
  }
  return engineChoiceText({ N, dimension: regionDimension(v.regionKind), truncation: ruleOnly(v), requested: v.engine, denseMaxN, periodic: isPeriodicRegionKind(v.regionKind) });
}

const relationListEngineNote = 'A relation list runs on the dense engine: it has no coordinates to sweep.';

/** The engine the shared rule picks, in one sentence, or why it refuses (both run forms show this). */
function engineChoiceText(input: Parameters<typeof chooseEngine>[0]): string {
  try {
    const choice = chooseEngine(input);
    if (choice.engine === 'dense') return `Dense engine (${choice.reason}); it computes the whole spectrum.`;
    if (choice.reason.includes('only the modes above the cut')) return `Structured engine (${choice.reason}).`;
    return `Structured engine (${choice.reason}): only the modes above the cut are computed.`;
  } catch (error) {
    return `${capitalise((error as Error).message)}.`;
  }
}

/** What the re-analysed run is: its size, dimension and whether it has coordinates to sweep. */
export interface ReanalysedRun {
  N: number;
  dimension: 2 | 4;
  periodic: boolean;
  /** an imported relation list: no coordinates, so the dense engine only */
  relationOnly: boolean;
}

/** The engine the rule picks for the re-analysis as typed, or why it cannot run; same rule as the server. */
export function reanalyseEngineNote(v: ReanalyseFormValues, run: ReanalysedRun, denseMaxN: number = denseLimitN): string {
  if (run.relationOnly && v.engine !== 'structured') return relationListEngineNote;
  if (run.relationOnly) return 'The structured engine needs coordinates; a relation list runs on the dense engine only.';
  const truncation = { rule: v.truncation.kind } as TruncationRule;
  return engineChoiceText({ N: run.N, dimension: run.dimension, truncation, requested: v.engine, denseMaxN, periodic: run.periodic });
}
