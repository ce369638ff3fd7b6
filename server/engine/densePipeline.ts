import { ruleCautions, type SubregionSpec } from '@shared/vacuum';
import { entanglementEntropy, subregionElements } from './entropy';
import { EngineInputError } from './errors';
import { retardedGreenOperator } from './green';
import type { LinearAlgebraBackend } from './linalg/backend';
import { causalMatrix, linkMatrix, type BitRelation } from './order';
import { linearExtension } from './orderAlgorithms';
import { pauliJordan, pauliJordanSpectrum } from './pauliJordan';
import type { PlacedPoints } from './placement';
import { ENGINE_VERSION, requestTruncation, type VacuumRequest, type VacuumResult } from './request';
import { sjDiagnostics } from './sjDiagnostics';
import { sjState } from './sjState';
import type { StageRunner } from './stages';
import type { EngineChoice } from './structured/engineChoice';
import { applyTruncation } from './truncation';

/**
 * The `order`, `green` and `spectrum` stages of the dense engine, shared by a run and a study cell:
 * the causal order (and in 4D its links), the retarded Green function K, Δ = K − Kᵀ and the spectrum
 * of iΔ (server/engine/README.md §1–§4).
 */
export async function denseSpectrumStages(placed: PlacedPoints, mass: number, backend: LinearAlgebraBackend, stage: StageRunner) {
  const { points, dimension, density, region } = placed;
  const order = await stage('order', () => {
    const causal: BitRelation = placed.relation ?? causalMatrix(points, dimension, region?.periodX);
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

/** The element list of a subregion on a set without coordinates (validation refuses diamonds there). */
function listedElements(spec: SubregionSpec, count: number): Int32Array {
  if (spec.kind !== 'elements') throw new EngineInputError('a causal set given by its relation needs the subregion as a list of elements');
  const unique = Array.from(new Set(spec.indices)).sort((a, b) => a - b);
  const missing = unique.find((i) => i >= count);
  if (missing !== undefined) throw new EngineInputError(`subregion element ${missing} does not exist (the causal set has ${count} elements)`);
  return Int32Array.from(unique);
}

/**
 * The dense engine after placement (server/engine/README.md §1–§11): causal order, retarded Green
 * function, Pauli–Jordan spectrum, (truncated) SJ state with its diagnostics, and the entanglement
 * entropy of a subregion when one is given.
 */
export async function denseVacuum(input: {
  request: VacuumRequest;
  placed: PlacedPoints;
  stage: StageRunner;
  backend: LinearAlgebraBackend;
  choice: EngineChoice;
  timings: VacuumResult['timings'];
}): Promise<VacuumResult> {
  const { request, placed, stage, backend, choice } = input;
  const { points, dimension, density, region, n } = placed;
  const mass = request.mass ?? 0;
  const { causal, links, delta, spectrum } = await denseSpectrumStages(placed, mass, backend, stage);

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

  let entropy: VacuumResult['entropy'] = null;
  if (request.subregion) {
    const subregion = request.subregion;
    entropy = await stage('entropy', () => {
      const elements = placed.relation ? listedElements(subregion, n) : subregionElements(subregion, points, dimension, region?.periodX);
      if (elements.length < 2) {
        throw new EngineInputError(`the subregion holds ${elements.length} element(s); the entropy needs at least 2`);
      }
      return { ...entanglementEntropy(state, elements, { doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut, backend }), elements, renyi: null };
    });
  }

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
    entropy,
    mutualInformation: null,
    complement: null,
    cautions: ruleCautions(
      dimension,
      { truncation: truncationRule, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut },
      { modes: truncation.modesKept, of: spectrum.positive.length },
    ),
    timings: input.timings,
    ...(request.keepState ? { state } : {}),
  };
}
