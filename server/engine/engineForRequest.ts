import { isPeriodicRegionKind } from '@shared/regions';
import { sprinklingSpecSchema } from '@shared/vacuum';
import { EngineInputError } from './errors';
import { checkDenseSize, DENSE_SIZE_LIMIT } from './limits';
import { makeRegion } from './regions';
import { requestTruncation, type VacuumRequest } from './request';
import { chooseEngine, STRUCTURED_MAX_N_2D, structuredUnsupportedReason, type EngineChoice } from './structured/engineChoice';

/** What the engine choice needs to know before any work: the size (worst case for Poisson), the dimension, a periodic x. */
export function requestShape(request: VacuumRequest): { N: number; dimension: 2 | 4; periodic: boolean } | null {
  const source = request.source;
  if (source.kind === 'order') return null;
  if (source.kind === 'points') {
    const d = source.dimension;
    const periodic = source.region ? isPeriodicRegionKind(source.region.kind) : false;
    return { N: Math.floor(source.points.length / d), dimension: d, periodic };
  }
  const parsed = sprinklingSpecSchema.safeParse(source.sprinkling);
  if (!parsed.success) return null;
  const region = makeRegion(parsed.data.region);
  const mean = parsed.data.count ?? (parsed.data.density as number) * region.volume;
  const worst = parsed.data.process === 'fixed' ? mean : Math.ceil(mean + 5 * Math.sqrt(mean));
  return { N: worst, dimension: region.dimension, periodic: region.periodX !== undefined };
}

/** The documented rule of structured/engineChoice.ts applied to a request; a refused request is an input error. */
export function engineForRequest(request: VacuumRequest, denseMaxN: number): EngineChoice {
  if (request.source.kind === 'order') {
    if (request.engine === 'structured') throw new EngineInputError('the structured engine needs coordinates (light-cone sweep); a causal set given by its order runs on the dense engine');
    return { engine: 'dense', reason: 'a causal set given by its order alone has no coordinates for the structured engine' };
  }
  const shape = requestShape(request);
  // an unparsable request is left to validateVacuumRequest, which says what is wrong
  if (!shape) return { engine: 'dense', reason: 'the request is checked by the dense validation' };
  try {
    return chooseEngine({ N: shape.N, dimension: shape.dimension, truncation: requestTruncation(request), requested: request.engine, denseMaxN, periodic: shape.periodic });
  } catch (error) {
    throw new EngineInputError((error as Error).message);
  }
}

/**
 * The engine the rule picks for a request and that engine's size limit. A request only the dense engine
 * can serve (no cut, knee, 4D, cylinder) that is over the dense limit is refused with the dense engine's
 * memory reason and why the structured engine cannot take it.
 */
export function engineAndLimit(request: VacuumRequest, denseMaxN: number): { choice: EngineChoice; maxN: number } {
  try {
    const choice = engineForRequest(request, denseMaxN);
    return { choice, maxN: choice.engine === 'structured' ? STRUCTURED_MAX_N_2D : denseMaxN };
  } catch (error) {
    const shape = request.source.kind === 'order' ? null : requestShape(request);
    if (shape && request.engine !== 'structured') {
      const unsupported = structuredUnsupportedReason(shape.dimension, requestTruncation(request), shape.periodic);
      if (unsupported) {
        try {
          checkDenseSize(shape.N, denseMaxN);
        } catch (dense) {
          throw new EngineInputError(`${(dense as Error).message}; ${unsupported}`);
        }
      }
    }
    // a forced structured engine that cannot serve the request at all: the engine setting is at fault
    if (error instanceof EngineInputError && error.field === undefined && request.engine === 'structured') {
      if (!shape || structuredUnsupportedReason(shape.dimension, requestTruncation(request), shape.periodic)) throw new EngineInputError(error.message, 'engine');
    }
    throw error;
  }
}

/** The size limit of the engine the rule picks for a request on the automatic backend (structured: STRUCTURED_MAX_N_2D). */
export function sizeLimitFor(request: VacuumRequest): number {
  return engineAndLimit(request, DENSE_SIZE_LIMIT.maxN).maxN;
}
