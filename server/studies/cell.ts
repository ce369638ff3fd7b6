import type { ResolvedSubregion, StudyRule } from '../../shared/studies';
import { studyRuleKey } from '../../shared/studies';
import type { SprinklingSpecInput, VacuumStage } from '../../shared/vacuum';
import { sprinklingSpecSchema } from '../../shared/vacuum';
import { entanglementEntropy, subregionElements } from '../engine/entropy';
import { retardedGreen } from '../engine/green';
import {
  CancelledError,
  checkDenseSize,
  DENSE_SIZE_LIMIT,
  ENGINE_VERSION,
  EngineInputError,
  validateVacuumRequest,
  type VacuumHooks,
} from '../engine/index';
import { getBackend, type BackendPreference } from '../engine/linalg';
import { causalMatrix, linkMatrix } from '../engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../engine/pauliJordan';
import { sjState } from '../engine/sjState';
import { sprinkle } from '../engine/sprinkle';
import { applyTruncation } from '../engine/truncation';
import { engineSubregion } from './plan';

/** Everything one sprinkling of a study needs: the points, the field and what to compute on them. */
export interface StudyCellSpec {
  sprinkling: SprinklingSpecInput;
  mass: number;
  subregions: ResolvedSubregion[];
  rules: StudyRule[];
  backend?: BackendPreference;
}

export interface StudyCellEntropy {
  subregion: string;
  rule: string;
  n: number;
  S: number;
  modesKept: number;
  cutoff: number;
}

export interface StudyCellResult {
  engineVersion: string;
  backend: string;
  /** actual number of elements */
  N: number;
  density: number | null;
  /** positive eigenvalues of iΔ of the whole region, descending */
  eigenvalues: Float64Array;
  /** whole-region cut per rule */
  states: { rule: string; cutoff: number; modesKept: number }[];
  entropies: StudyCellEntropy[];
  sprinkling: { seed: string; prng: string; process: string } | null;
  /** seconds per stage; `entropy` covers every subregion and rule */
  timings: Partial<Record<VacuumStage, number>>;
}

/**
 * One cell of a scaling study: one sprinkling, one eigendecomposition, the SJ state once per rule,
 * then the entropy of every subregion under every rule (physics notes §4–5: the SJ state, its truncation, Sorkin's spacetime
 * entanglement entropy and the double truncation of Sorkin–Yazdi 2018). Progress: the vacuum stages,
 * then `entropy` with the fraction of (subregion, rule) pairs done; cancellation is checked between them.
 * The stages are those of computeVacuum (server/engine/index.ts) without its state diagnostics, whose
 * exact positivity check alone costs a 2N × 2N eigendecomposition for an untruncated state.
 */
export async function computeStudyCell(spec: StudyCellSpec, hooks: VacuumHooks = {}): Promise<StudyCellResult> {
  const backend = getBackend(spec.backend ?? 'auto');
  validateVacuumRequest({ source: { kind: 'sprinkling', sprinkling: spec.sprinkling }, mass: spec.mass }, DENSE_SIZE_LIMIT.maxN);
  const timings: Partial<Record<VacuumStage, number>> = {};
  const stage = async <T>(name: VacuumStage, work: () => T): Promise<T> => {
    if (hooks.shouldCancel?.()) throw new CancelledError(name);
    hooks.onProgress?.(name, 0);
    // yield so a cancel request or a progress message can get through
    await new Promise((resolve) => setImmediate(resolve));
    if (hooks.shouldCancel?.()) throw new CancelledError(name);
    const start = performance.now();
    const value = work();
    timings[name] = (performance.now() - start) / 1000;
    hooks.onProgress?.(name, 1);
    return value;
  };

  const placed = await stage('sprinkle', () => {
    const s = sprinkle(sprinklingSpecSchema.parse(spec.sprinkling));
    checkDenseSize(s.count, DENSE_SIZE_LIMIT.maxN);
    return s;
  });
  const { points, dimension, region } = placed;
  const size = placed.count;
  const order = await stage('order', () => {
    const causal = causalMatrix(points, dimension, region.periodX);
    return { causal, links: dimension === 4 ? linkMatrix(causal) : undefined };
  });
  const k = await stage('green', () =>
    retardedGreen({ points, dimension, causal: order.causal, links: order.links, density: placed.density, mass: spec.mass, backend }),
  );
  const { delta, spectrum } = await stage('spectrum', () => {
    const delta = pauliJordan(k);
    return { delta, spectrum: pauliJordanSpectrum(delta, { backend }) };
  });
  const states = await stage('state', () =>
    spec.rules.map((rule) => {
      let truncation;
      try {
        truncation = applyTruncation(spectrum.positive, size, rule.truncation);
      } catch (error) {
        throw new EngineInputError((error as Error).message);
      }
      return { rule, key: studyRuleKey(rule), state: sjState(delta, spectrum, truncation, backend) };
    }),
  );

  if (hooks.shouldCancel?.()) throw new CancelledError('entropy');
  hooks.onProgress?.('entropy', 0);
  const entropyStart = performance.now();
  const entropies: StudyCellEntropy[] = [];
  const total = spec.subregions.length * states.length;
  for (const subregion of spec.subregions) {
    const elements = subregionElements(engineSubregion(subregion), points, dimension, region.periodX);
    if (elements.length < 2) {
      throw new EngineInputError(`${subregion.label} holds ${elements.length} element(s) in this sprinkling; the entropy needs at least 2`);
    }
    for (const { rule, key, state } of states) {
      if (hooks.shouldCancel?.()) throw new CancelledError('entropy');
      const e = entanglementEntropy(state, elements, { doubleTruncation: rule.doubleTruncation, backend });
      entropies.push({ subregion: subregion.key, rule: key, n: e.n, S: e.S, modesKept: e.modesKept, cutoff: e.cutoff });
      hooks.onProgress?.('entropy', entropies.length / total);
      await new Promise((resolve) => setImmediate(resolve));
    }
  }
  timings.entropy = (performance.now() - entropyStart) / 1000;
  return {
    engineVersion: ENGINE_VERSION,
    backend: backend.name,
    N: size,
    density: placed.density,
    eigenvalues: spectrum.positive,
    states: states.map(({ key, state }) => ({ rule: key, cutoff: state.cutoff, modesKept: state.modesKept })),
    entropies,
    sprinkling: placed.provenance,
    timings,
  };
}
