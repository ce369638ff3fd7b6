import type { ResolvedSubregion, StudyRule } from '../../shared/studies';
import { studyRuleKey } from '../../shared/studies';
import type { RegionSpec, SprinklingSpecInput, VacuumStage } from '../../shared/vacuum';
import { sprinklingSpecSchema } from '../../shared/vacuum';
import { entanglementEntropy, subregionElements } from '../engine/entropy';
import { retardedGreenOperator } from '../engine/green';
import {
  CancelledError,
  checkDenseSize,
  stageRunner,
  DENSE_SIZE_LIMIT,
  ENGINE_VERSION,
  EngineInputError,
  validateVacuumRequest,
  type PointSource,
  type VacuumHooks,
} from '../engine/index';
import { getBackend, type BackendPreference } from '../engine/linalg';
import { BitRelation, causalMatrix, linkMatrix } from '../engine/order';
import { makeRegion, type Region } from '../engine/regions';
import { pauliJordan, pauliJordanSpectrum } from '../engine/pauliJordan';
import { sjState } from '../engine/sjState';
import { sprinkle } from '../engine/sprinkle';
import { applyTruncation } from '../engine/truncation';
import { engineSubregion } from './plan';

/**
 * An imported causal set as one cell computes on it: its coordinates (with the region it was imported
 * with, or its density), or its closed relation bit-packed like BitRelation (⌈N/32⌉ words per row).
 */
export type ImportedCellSource =
  | { kind: 'points'; points: Float64Array; dimension: 2 | 4; region: RegionSpec | null; density: number | null }
  | { kind: 'order'; causal: Uint32Array; count: number; dimension: 2 | 4; density: number | null };

/** Everything one cell of a study needs: the points (a sprinkling or an imported set), the field and what to compute on them. */
export interface StudyCellSpec {
  /** exactly one of `sprinkling` and `imported` */
  sprinkling?: SprinklingSpecInput;
  imported?: ImportedCellSource;
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
 * then the entropy of every subregion under every rule (server/engine/README.md §5–§10: the SJ state, its truncation, Sorkin's spacetime
 * entanglement entropy and the double truncation of Sorkin–Yazdi 2018). Progress: the vacuum stages,
 * then `entropy` with the fraction of (subregion, rule) pairs done; cancellation is checked between them.
 * The stages are those of computeVacuum (server/engine/index.ts) without its state diagnostics, whose
 * exact positivity check alone costs a 2N × 2N eigendecomposition for an untruncated state.
 */
export async function computeStudyCell(spec: StudyCellSpec, hooks: VacuumHooks = {}): Promise<StudyCellResult> {
  const backend = getBackend(spec.backend ?? 'auto');
  if ((spec.sprinkling === undefined) === (spec.imported === undefined)) throw new EngineInputError('a study cell needs exactly one of a sprinkling and an imported causal set');
  validateVacuumRequest({ source: cellPointSource(spec), mass: spec.mass }, DENSE_SIZE_LIMIT.maxN);
  const timings: Partial<Record<VacuumStage, number>> = {};
  const stage = stageRunner(hooks, timings);

  const placed = await stage('sprinkle', (): PlacedCell => {
    if (spec.imported) return placeImported(spec.imported);
    const s = sprinkle(sprinklingSpecSchema.parse(spec.sprinkling));
    checkDenseSize(s.count, DENSE_SIZE_LIMIT.maxN);
    return { points: s.points, dimension: s.dimension, count: s.count, density: s.density, region: s.region, relation: null, provenance: s.provenance };
  });
  const { points, dimension, region } = placed;
  const size = placed.count;
  const order = await stage('order', () => {
    const causal = placed.relation ?? causalMatrix(points, dimension, region?.periodX);
    return { causal, links: dimension === 4 ? linkMatrix(causal) : undefined };
  });
  const k = await stage('green', () =>
    retardedGreenOperator({
      points,
      dimension,
      causal: order.causal,
      links: order.links,
      density: placed.density ?? undefined,
      mass: spec.mass,
      backend,
      // without coordinates there is no time to sort by; the relation itself gives a linear extension
      linearExtension: placed.relation && spec.mass > 0 ? linearExtension(placed.relation) : undefined,
      // on the cylinder K counts the images through which a pair is related, not just whether it is
      periodX: region?.periodX,
    }),
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
    const elements = placed.relation ? listedElements(subregion, size) : subregionElements(engineSubregion(subregion), points, dimension, region?.periodX);
    if (elements.length < 2) {
      throw new EngineInputError(`${subregion.label} holds ${elements.length} element(s) in this ${spec.imported ? 'causal set' : 'sprinkling'}; the entropy needs at least 2`);
    }
    for (const { rule, key, state } of states) {
      if (hooks.shouldCancel?.()) throw new CancelledError('entropy');
      const e = entanglementEntropy(state, elements, { doubleTruncation: rule.doubleTruncation, restrictedCut: rule.restrictedCut, backend });
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

interface PlacedCell {
  points: Float64Array;
  dimension: 2 | 4;
  count: number;
  density: number | null;
  region: Region | null;
  /** the closed relation of a set without coordinates */
  relation: BitRelation | null;
  provenance: StudyCellResult['sprinkling'];
}

/** The engine's view of the cell's elements, for validateVacuumRequest. */
function cellPointSource(spec: StudyCellSpec): PointSource {
  const imported = spec.imported;
  if (!imported) return { kind: 'sprinkling', sprinkling: spec.sprinkling! };
  const density = imported.density !== null ? { density: imported.density } : {};
  if (imported.kind === 'order') return { kind: 'order', causal: imported.causal, count: imported.count, dimension: imported.dimension, ...density };
  // with the region, ρ = N/V and a cylinder's periodic x come from it, as for a run on the same set
  return { kind: 'points', points: imported.points, dimension: imported.dimension, ...(imported.region ? { region: imported.region } : density) };
}

/** An imported set in place of a sprinkling: coordinates checked against their region, or the relation as given. */
function placeImported(imported: ImportedCellSource): PlacedCell {
  if (imported.kind === 'order') {
    checkDenseSize(imported.count, DENSE_SIZE_LIMIT.maxN);
    const relation = new BitRelation(imported.count);
    relation.words.set(imported.causal);
    return { points: new Float64Array(0), dimension: imported.dimension, count: imported.count, density: imported.density, region: null, relation, provenance: null };
  }
  const d = imported.dimension;
  const count = imported.points.length / d;
  checkDenseSize(count, DENSE_SIZE_LIMIT.maxN);
  const region = imported.region ? makeRegion(imported.region) : null;
  if (region) {
    for (let i = 0; i < count; i++) {
      if (!region.contains(imported.points.subarray(i * d, (i + 1) * d))) throw new EngineInputError(`element ${i} lies outside the ${region.spec.kind} region`);
    }
  }
  const density = region ? count / region.volume : imported.density;
  return { points: imported.points, dimension: d, count, density, region, relation: null, provenance: null };
}

/**
 * A labelling that respects ≺ from the relation alone: i ≺ j makes the past of j strictly larger than
 * the past of i (transitivity), so sorting by past size is a linear extension. The same rule as the
 * engine's order source (server/engine/index.ts), which keeps its copy private.
 */
function linearExtension(causal: BitRelation): Int32Array {
  const pastSize = new Int32Array(causal.size);
  causal.forEach((_i, j) => {
    pastSize[j] += 1;
  });
  return Int32Array.from({ length: causal.size }, (_, i) => i).sort((a, b) => pastSize[a]! - pastSize[b]! || a - b);
}

/** The element list of a subregion on a set without coordinates (a diamond needs coordinates). */
function listedElements(subregion: ResolvedSubregion, count: number): Int32Array {
  if (!subregion.elements) throw new EngineInputError(`${subregion.label}: a causal set given by its relation needs the subregion as a list of elements`);
  const missing = subregion.elements.find((i) => i >= count);
  if (missing !== undefined) throw new EngineInputError(`${subregion.label}: element ${missing} does not exist (the causal set has ${count} elements)`);
  return Int32Array.from(new Set(subregion.elements)).sort();
}
