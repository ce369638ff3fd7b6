import { ruleCautions, type TruncationRule } from '@shared/vacuum';
import { lightConeNeighbourhood } from '../causalSeparation';
import { EngineInputError } from '../errors';
import type { LinearAlgebraBackend } from '../linalg/backend';
import type { PlacedPoints } from '../placement';
import { ENGINE_VERSION, requestTruncation, type VacuumHooks, type VacuumRequest, type VacuumResult } from '../request';
import type { StageRunner } from '../stages';
import { entropyStage, subregionSets } from '../subregionEntropies';
import { applyTruncation, sqrtNCutoff } from '../truncation';
import { dominanceSweep, lightConeSweep, PauliJordan2D } from './dominance2d';
import type { EngineChoice } from './engineChoice';
import { factoredEntropy } from './factoredEntropy';
import { factoredDiagnostics, factoredState } from './factoredState';
import { topSkewPairs } from './lanczos';

/**
 * The structured pipeline for 2D (issue 9): light-cone sweep order, Δ as an operator, the pairs above
 * the cut by block skew Lanczos, the truncated state as N × k factors, its checks, and the entropies
 * from the rows of the subregion, of a pair A, B and of the causal complement (server/engine/README.md
 * §15; pair and complement found by the light-cone staircase of causalSeparation.ts). `eigenvalues` in the result are the computed ones only (those above the cut,
 * one more for modes:K), never the whole spectrum.
 */
export async function structuredVacuum(input: {
  request: VacuumRequest;
  hooks: VacuumHooks;
  placed: PlacedPoints;
  stage: StageRunner;
  backend: LinearAlgebraBackend;
  choice: EngineChoice;
  timings: VacuumResult['timings'];
}): Promise<VacuumResult> {
  const { request, hooks, placed, stage, backend, choice } = input;
  const { points, dimension, density, region } = placed;
  if (dimension !== 2) throw new EngineInputError('the structured engine is 2D only');
  const n = points.length / 2;
  const mass = request.mass ?? 0;
  const truncationRule: TruncationRule = requestTruncation(request);

  const { sweep, relations, sets } = await stage('order', () => {
    // the subregions first, so a bad pair or complement is refused before the Lanczos solve
    const sets = subregionSets(request, placed, (elements) => lightConeNeighbourhood(points, elements));
    const t = new Float64Array(n);
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      t[i] = points[2 * i];
      x[i] = points[2 * i + 1];
    }
    const sweep = lightConeSweep(t, x);
    // relations = Σ_x (Cᵀ1)_x, one dominance sweep
    const sums = new Float64Array(n);
    dominanceSweep(sweep, new Float64Array(n).fill(1), sums, 0, false);
    let relations = 0;
    for (let i = 0; i < n; i++) relations += sums[i];
    return { sweep, relations, sets };
  });

  const operator = await stage('green', () => new PauliJordan2D(sweep, { mass, density: density ?? undefined, backend }));

  const pairs = await stage('spectrum', () => {
    const options =
      truncationRule.rule === 'modes'
        ? { count: Math.min(truncationRule.count + 1, Math.floor(n / 2)) }
        : { cut: truncationRule.rule === 'lambda' ? truncationRule.cut : sqrtNCutoff(n) };
    if (truncationRule.rule === 'modes' && truncationRule.count > Math.floor(n / 2)) {
      throw new EngineInputError(`modes:${truncationRule.count} asks for more than the ${Math.floor(n / 2)} pairs ${n} elements can have`);
    }
    return topSkewPairs(operator, {
      ...options,
      backend,
      expectedPairs: truncationRule.rule === 'modes' ? truncationRule.count : 2 * Math.sqrt(n),
      onProgress: (p) => hooks.onProgress?.('spectrum', p.wanted > 0 ? Math.min(0.99, p.converged / (p.wanted + 3)) : 0),
    });
  });

  const { truncation, state, diagnostics } = await stage('state', () => {
    let truncation;
    try {
      truncation = applyTruncation(pairs.sigma, n, truncationRule);
    } catch (error) {
      throw new EngineInputError((error as Error).message);
    }
    const keep = truncation.modesKept;
    const kept = { ...pairs, sigma: pairs.sigma.subarray(0, keep), a: pairs.a.slice(0, keep), b: pairs.b.slice(0, keep) };
    const state = factoredState(kept, truncation.cutoff);
    return { truncation, state, diagnostics: factoredDiagnostics(state, pairs.relativeResiduals.subarray(0, keep), backend) };
  });

  const entropies = await entropyStage(stage, request, sets, (elements, cut) => factoredEntropy(state, elements, { ...cut, backend }), hooks);

  return {
    engineVersion: ENGINE_VERSION,
    engine: 'structured',
    engineReason: choice.reason,
    backend: backend.name,
    dimension: 2,
    N: n,
    points,
    density,
    volume: region?.volume ?? null,
    region: region?.spec ?? null,
    sprinkling: placed.provenance,
    mass,
    relations,
    links: null,
    eigenvalues: Float64Array.from(pairs.sigma),
    truncation: truncationRule,
    cutoff: truncation.cutoff,
    modesKept: truncation.modesKept,
    knee: null,
    diagnostics,
    ...entropies,
    // 2D regions only: flat ones need no caution for these cuts, de Sitter ones do (shared/vacuum.ts ruleCautions)
    cautions: ruleCautions(2, { truncation: truncationRule, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut }, undefined, region?.spec.kind),
    timings: input.timings,
  };
}
