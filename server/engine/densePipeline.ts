import { ruleCautions } from '@shared/vacuum';
import { relationNeighbourhood } from './causalSeparation';
import { entanglementEntropy } from './entropy';
import { EngineInputError } from './errors';
import { retardedGreenOperator } from './green';
import type { LinearAlgebraBackend } from './linalg/backend';
import { causalMatrix, linkMatrix, type BitRelation } from './order';
import { linearExtension } from './orderAlgorithms';
import { pauliJordan, pauliJordanSpectrum } from './pauliJordan';
import type { PlacedPoints } from './placement';
import { ENGINE_VERSION, requestTruncation, type VacuumHooks, type VacuumRequest, type VacuumResult } from './request';
import { sjDiagnostics } from './sjDiagnostics';
import { sjState } from './sjState';
import type { StageRunner } from './stages';
import { entropyStage, subregionSets, type SubregionSets } from './subregionEntropies';
import type { EngineChoice } from './structured/engineChoice';
import { applyTruncation } from './truncation';

/**
 * The `order`, `green` and `spectrum` stages of the dense engine, shared by a run and a study cell:
 * the causal order (and in 4D its links), the retarded Green function K, Δ = K − Kᵀ and the spectrum
 * of iΔ (server/engine/README.md §1–§4).
 */
export async function denseSpectrumStages(
  placed: PlacedPoints,
  mass: number,
  backend: LinearAlgebraBackend,
  stage: StageRunner,
  /** called inside the order stage with the causal relation, before any heavy stage (to check subregions early) */
  onOrder?: (causal: BitRelation) => void,
) {
  const { points, dimension, density, region } = placed;
  const order = await stage('order', () => {
    const causal: BitRelation = placed.relation ?? causalMatrix(points, dimension, region?.periodX);
    onOrder?.(causal);
    const links = dimension === 4 ? linkMatrix(causal) : null;
    return { causal, links };
  });

  const k = await stage('green', () =>
    retardedGreenOperator({
      points,
      dimension,
      causal: order.causal,
      links: order.links ?? undefined,
      density: density ?? undefined,
      mass,
      backend,
      // without coordinates there is no time to sort by; the relation itself gives a linear extension
      linearExtension: placed.relation && mass > 0 ? linearExtension(placed.relation) : undefined,
      // on the cylinder K counts the images through which a pair is related, not just whether it is
      periodX: region?.periodX,
    }),
  );

  const { delta, spectrum } = await stage('spectrum', () => {
    const delta = pauliJordan(k);
    return { delta, spectrum: pauliJordanSpectrum(delta, { backend }) };
  });
  return { causal: order.causal, links: order.links, delta, spectrum };
}

/**
 * The dense engine after placement (server/engine/README.md §1–§11): causal order, retarded Green
 * function, Pauli–Jordan spectrum, (truncated) SJ state with its diagnostics, and the entanglement
 * entropies asked for (§15): the subregion's with its Rényi entropies, the mutual information of a
 * pair, the causal complement's. The pair and the complement are found from the causal bit rows.
 */
export async function denseVacuum(input: {
  request: VacuumRequest;
  hooks?: VacuumHooks;
  placed: PlacedPoints;
  stage: StageRunner;
  backend: LinearAlgebraBackend;
  choice: EngineChoice;
  timings: VacuumResult['timings'];
}): Promise<VacuumResult> {
  const { request, placed, stage, backend, choice } = input;
  const { points, dimension, density, region, n } = placed;
  const mass = request.mass ?? 0;
  let sets: SubregionSets = { main: null, pair: null, complement: null };
  const { causal, links, delta, spectrum } = await denseSpectrumStages(placed, mass, backend, stage, (relation) => {
    sets = subregionSets(request, placed, (elements) => relationNeighbourhood(relation, elements));
  });

  const truncationRule = requestTruncation(request);
  const { truncation, state, diagnostics } = await stage('state', () => {
    let truncation;
    try {
      truncation = applyTruncation(spectrum.positive, n, truncationRule);
    } catch (error) {
      throw new EngineInputError((error as Error).message);
    }
    const state = sjState(delta, spectrum, truncation, backend);
    return { truncation, state, diagnostics: sjDiagnostics(state, spectrum.positive, backend) };
  });

  const entropies = await entropyStage(stage, request, sets, (elements, cut) => entanglementEntropy(state, elements, { ...cut, backend }), input.hooks ?? {});

  return {
    engineVersion: ENGINE_VERSION,
    engine: 'dense',
    engineReason: choice.reason,
    backend: backend.name,
    dimension,
    N: n,
    points,
    density,
    volume: region?.volume ?? null,
    region: region?.spec ?? null,
    sprinkling: placed.provenance,
    mass,
    relations: causal.count(),
    links: links ? links.count() : null,
    eigenvalues: spectrum.positive,
    truncation: truncationRule,
    cutoff: truncation.cutoff,
    modesKept: truncation.modesKept,
    knee: truncation.knee ?? null,
    diagnostics,
    ...entropies,
    cautions: ruleCautions(
      dimension,
      { truncation: truncationRule, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut },
      { modes: truncation.modesKept, of: spectrum.positive.length },
      region?.spec.kind,
    ),
    timings: input.timings,
    ...(request.keepState ? { state } : {}),
  };
}
