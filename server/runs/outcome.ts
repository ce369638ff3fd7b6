import type { RunOutcome } from '../db/repositories/runs';
import type { EntropyPartRecord, RunSummaryRecord } from '../db/run-entities';
import { encodeFloat64, encodeInt32 } from '../db/codecs';
import type { VacuumResult } from '../engine/index';

/** The engine's diagnostics under the names of shared/runs.ts, with the engine's own fields beside them. */
function diagnosticsRecord(d: VacuumResult['diagnostics']): Record<string, unknown> {
  return {
    hermiticity: d.hermiticityError,
    minEigenvalueW: d.smallestEigenvalue,
    commutatorResidual: d.commutatorError,
    positiveNegativeOverlap: d.orthogonalityError,
    ...d,
  };
}

/** The scalars of one entropy beside the subregion's; its element list is not stored (the request recomputes it). */
function entropyPart(part: Pick<NonNullable<VacuumResult['complement']>, 'S' | 'n' | 'modesKept' | 'cutoff' | 'restrictedCut'>): EntropyPartRecord {
  return { S: part.S, n: part.n, modesKept: part.modesKept, cutoff: part.cutoff, restrictedCut: part.restrictedCut ?? null };
}

/** The engine's result as the run's row keeps it: scalars in `summary`, the long arrays encoded for bytea. */
export function outcomeOf(result: VacuumResult): RunOutcome {
  const summary: RunSummaryRecord = {
    density: result.density,
    volume: result.volume,
    relations: result.relations,
    links: result.links,
    cutoff: result.cutoff,
    modesKept: result.modesKept,
    knee: result.knee,
    diagnostics: diagnosticsRecord(result.diagnostics),
    timings: result.timings as Record<string, number>,
    entropy: result.entropy
      ? {
          S: result.entropy.S,
          n: result.entropy.n,
          modesKept: result.entropy.modesKept,
          cutoff: result.entropy.cutoff,
          doubleTruncation: result.entropy.doubleTruncation,
          restrictedCut: result.entropy.restrictedCut,
          renyi: result.entropy.renyi ?? null,
        }
      : null,
    mutualInformation: result.mutualInformation
      ? {
          I: result.mutualInformation.I,
          a: entropyPart(result.mutualInformation.a),
          b: entropyPart(result.mutualInformation.b),
          union: entropyPart(result.mutualInformation.union),
        }
      : null,
    complement: result.complement ? { ...entropyPart(result.complement), difference: result.complement.difference } : null,
    manifold: result.manifold ?? null,
    cautions: result.cautions,
    engine: result.engine,
    engineReason: result.engineReason,
  };
  return {
    n: result.N,
    engineVersion: result.engineVersion,
    backend: result.backend,
    entropyS: result.entropy?.S ?? null,
    summary,
    points: encodeFloat64(result.points),
    eigenvalues: encodeFloat64(result.eigenvalues),
    generalizedEigenvalues: result.entropy ? encodeFloat64(result.entropy.generalizedEigenvalues) : null,
    subregionElements: result.entropy ? encodeInt32(result.entropy.elements) : null,
  };
}
