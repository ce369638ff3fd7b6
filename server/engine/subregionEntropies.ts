import type { SubregionSpec } from '@shared/vacuum';
import { causalComplement, type CausalNeighbourhood } from './causalSeparation';
import { subregionElements, type EntropyResult } from './entropy';
import { CancelledError, EngineInputError } from './errors';
import { mutualInformation, pairIssue } from './mutualInformation';
import type { PlacedPoints } from './placement';
import { renyiEntropies } from './renyi';
import type { VacuumHooks, VacuumRequest, VacuumResult } from './request';
import type { StageRunner } from './stages';
import { elementListIssue } from './subregionCheck';

/** The element sets whose entropies a request asks for, found before any heavy stage. */
export interface SubregionSets {
  /** the subregion O */
  main: Int32Array | null;
  /** A and B of the mutual information */
  pair: { a: Int32Array; b: Int32Array } | null;
  /** the causal complement O′ of O */
  complement: Int32Array | null;
}

/**
 * The elements of one subregion, refused with its field path when they cannot give an entropy: labels
 * the set lacks, a diamond on a set without coordinates, fewer than 2 elements.
 */
function elementsOf(spec: SubregionSpec, placed: PlacedPoints, field: string, name: string): Int32Array {
  if (spec.kind === 'elements') {
    const issue = elementListIssue(spec.indices, placed.n, true);
    if (issue) throw new EngineInputError(issue.message.replace(/^the subregion/, name), `${field}.indices`);
    return Int32Array.from(new Set(spec.indices)).sort();
  }
  if (placed.relation) throw new EngineInputError(`a causal set given by its relation has no coordinates: give ${name} as a list of elements`, field);
  const elements = subregionElements(spec, placed.points, placed.dimension, placed.region?.periodX);
  if (elements.length < 2) throw new EngineInputError(`${name} holds ${elements.length} element(s); the entropy needs at least 2`, field);
  return elements;
}

/**
 * Resolves the subregion, the pair A, B and the causal complement of a request on the placed set and
 * checks them (server/engine/README.md §15): A and B disjoint and spacelike in the order of the whole
 * set, each and O′ with at least 2 elements. `neighbourhoodOf` gives the causal future and past of an
 * element set in that order (bit rows, or light-cone coordinates in flat 2D). Cheap next to the
 * spectrum, so the pipelines call it right after the order and refuse a bad pair before any solve.
 */
export function subregionSets(
  request: VacuumRequest,
  placed: PlacedPoints,
  neighbourhoodOf: (elements: Int32Array) => CausalNeighbourhood,
): SubregionSets {
  const main = request.subregion ? elementsOf(request.subregion, placed, 'subregion', 'the subregion') : null;
  let pair: SubregionSets['pair'] = null;
  if (request.mutualInformation) {
    const a = elementsOf(request.mutualInformation.a, placed, 'mutualInformation.a', 'subregion A');
    const b = elementsOf(request.mutualInformation.b, placed, 'mutualInformation.b', 'subregion B');
    const issue = pairIssue(a, b, neighbourhoodOf(a));
    if (issue) throw new EngineInputError(issue.message, 'mutualInformation.b');
    pair = { a, b };
  }
  let complement: Int32Array | null = null;
  if (request.complement) {
    if (!main) throw new EngineInputError('the complement check needs a subregion', 'complement');
    complement = causalComplement(neighbourhoodOf(main), main, placed.n);
    if (complement.length < 2) {
      throw new EngineInputError(`the causal complement of the subregion holds ${complement.length} element(s); its entropy needs at least 2 (a smaller subregion leaves room beside it)`, 'complement');
    }
  }
  return { main, pair, complement };
}

/** How many entropies the `entropy` stage computes for these sets (0: the stage does not run). */
export function entropyCount(sets: SubregionSets): number {
  return (sets.main ? 1 : 0) + (sets.pair ? 3 : 0) + (sets.complement ? 1 : 0);
}

/**
 * The body of the `entropy` stage of both engines (server/engine/README.md §9–§11, §15): S of O with its
 * Rényi entropies, I(A:B) from S_A, S_B and S_{A∪B}, and S of the causal complement O′ with
 * S_O′ − S_O. `entropyOf` is the engine's own entropy on its state with the request's double truncation
 * and restricted cut, so each region is cut at its own √n/(4π). Progress is the fraction of the
 * entropies done, and a cancel request is honoured between them.
 */
export function subregionEntropies(
  request: VacuumRequest,
  sets: SubregionSets,
  entropyOf: (elements: Int32Array) => EntropyResult,
  hooks: VacuumHooks,
): Pick<VacuumResult, 'entropy' | 'mutualInformation' | 'complement'> {
  const total = entropyCount(sets);
  let done = 0;
  const counted = (elements: Int32Array): EntropyResult => {
    if (done > 0 && hooks.shouldCancel?.()) throw new CancelledError('entropy');
    const result = entropyOf(elements);
    done++;
    // the stage runner reports the stage's 1 itself
    if (done < total) hooks.onProgress?.('entropy', done / total);
    return result;
  };
  let entropy: VacuumResult['entropy'] = null;
  if (sets.main) {
    const result = counted(sets.main);
    entropy = { ...result, elements: sets.main, renyi: request.renyi ? renyiEntropies(result.generalizedEigenvalues, request.renyi) : null };
  }
  const pairResult = sets.pair ? mutualInformation(counted, sets.pair.a, sets.pair.b) : null;
  let complement: VacuumResult['complement'] = null;
  if (sets.complement && entropy) {
    const result = counted(sets.complement);
    complement = { ...result, elements: sets.complement, difference: result.S - entropy.S };
  }
  return { entropy, mutualInformation: pairResult, complement };
}

/**
 * The `entropy` stage as both pipelines run it: subregionEntropies under the stage runner when there is
 * any entropy to compute, and no stage at all otherwise. `entropyOf` takes an element list to its
 * EntropyResult on the engine's own state; the request's double truncation and restricted cut apply.
 */
export async function entropyStage(
  stage: StageRunner,
  request: VacuumRequest,
  sets: SubregionSets,
  entropyOf: (elements: Int32Array, cut: { doubleTruncation?: boolean; restrictedCut?: VacuumRequest['restrictedCut'] }) => EntropyResult,
  hooks: VacuumHooks,
): Promise<Pick<VacuumResult, 'entropy' | 'mutualInformation' | 'complement'>> {
  if (entropyCount(sets) === 0) return { entropy: null, mutualInformation: null, complement: null };
  const cut = { doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut };
  return stage('entropy', () => subregionEntropies(request, sets, (elements) => entropyOf(elements, cut), hooks));
}
