import type { ResolvedSubregion, StudyRule } from '@shared/studies';
import { studyRuleKey } from '@shared/studies';
import { sortedRenyiOrders, type RegionSpec, type RenyiOrder, type SprinklingSpecInput, type SubregionSpec, type VacuumStage } from '@shared/vacuum';
import { denseSpectrumStages } from '../engine/densePipeline';
import { entanglementEntropy, subregionElements, type EntropyResult } from '../engine/entropy';
import { CancelledError, EngineInputError } from '../engine/errors';
import { DENSE_SIZE_LIMIT } from '../engine/limits';
import { getBackend, type BackendPreference } from '../engine/linalg';
import { placeSource } from '../engine/placement';
import { ENGINE_VERSION, type PointSource, type VacuumHooks } from '../engine/request';
import { sjState } from '../engine/sjState';
import { stageRunner } from '../engine/stages';
import { applyTruncation } from '../engine/truncation';
import { validateVacuumRequest } from '../engine/validate';
import { mutualInformation, pairIssue } from '../engine/mutualInformation';
import { renyiEntropies } from '../engine/renyi';
import { engineSubregion, pairSubregions } from './plan';

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
  /** Rényi orders whose S_α each entropy also reports */
  renyi?: RenyiOrder[];
  backend?: BackendPreference;
}

export interface StudyCellEntropy {
  subregion: string;
  rule: string;
  /** for a pair: n, S, modesKept, cutoff and renyi of A∪B */
  n: number;
  S: number;
  modesKept: number;
  cutoff: number;
  /** S_α by renyiKey, when the study asked for Rényi orders */
  renyi?: Record<string, number>;
  /** a pair subregion: I(A:B) = S_A + S_B − S_{A∪B} and its parts (shared/studies.ts studyEntropySchema) */
  pair?: { size: number; separation: number; SA: number; SB: number; SAB: number; I: number; nA: number; nB: number; renyiI?: Record<string, number> };
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
 * entanglement entropy and the double truncation of Sorkin–Yazdi 2018), with the Rényi entropies S_α of
 * the same generalised eigenvalues μ when asked, and for a pair of sub-diamonds the mutual information
 * I(A:B) = S_A + S_B − S_{A∪B} of §15 (A and B checked disjoint and spacelike in the causal order first).
 * Progress: the vacuum stages, then `entropy` with the fraction of entropies done (three per pair and
 * rule); cancellation is checked between them.
 * Placement and the order, Green-function and spectrum stages are the dense engine's own (placeSource,
 * denseSpectrumStages); the state stage leaves out its diagnostics, whose exact positivity check alone
 * costs a 2N × 2N eigendecomposition for an untruncated state.
 */
export async function computeStudyCell(spec: StudyCellSpec, hooks: VacuumHooks = {}): Promise<StudyCellResult> {
  const backend = getBackend(spec.backend ?? 'auto');
  if ((spec.sprinkling === undefined) === (spec.imported === undefined)) throw new EngineInputError('a study cell needs exactly one of a sprinkling and an imported causal set');
  const source = cellPointSource(spec);
  validateVacuumRequest({ source, mass: spec.mass }, DENSE_SIZE_LIMIT.maxN);
  const timings: Partial<Record<VacuumStage, number>> = {};
  const stage = stageRunner(hooks, timings);

  const placed = await stage('sprinkle', () => placeSource(source, DENSE_SIZE_LIMIT.maxN));
  const { points, dimension, region } = placed;
  const size = placed.n;
  const { causal, delta, spectrum } = await denseSpectrumStages(placed, spec.mass, backend, stage);
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
  // one entropy per (subregion, rule), three (A, B, A∪B) for a pair: progress counts each
  const total = spec.subregions.reduce((sum, s) => sum + (s.pair ? 3 : 1), 0) * states.length;
  let done = 0;
  const elementsOf = (subregion: ResolvedSubregion, subregionSpec: SubregionSpec) => {
    const elements = subregionElements(subregionSpec, points, dimension, region?.periodX);
    if (elements.length < 2) {
      throw new EngineInputError(`${subregion.label} holds ${elements.length} element(s) in this ${spec.imported ? 'causal set' : 'sprinkling'}; the entropy needs at least 2`);
    }
    return elements;
  };
  // keys ascending with ∞ last, the order of every table, plot and export
  const renyiOrders = spec.renyi ? sortedRenyiOrders(spec.renyi) : null;
  const renyiOf = (e: EntropyResult) => (renyiOrders ? renyiEntropies(e.generalizedEigenvalues, renyiOrders) : undefined);
  for (const subregion of spec.subregions) {
    const pair = pairSubregions(subregion);
    if (pair) {
      if (placed.relation) throw new EngineInputError(`${subregion.label}: a pair of sub-diamonds needs the coordinates of the elements`);
      const a = elementsOf(subregion, pair.a);
      const b = elementsOf(subregion, pair.b);
      const issue = pairIssue(a, b, (i, j) => causal.has(i, j));
      if (issue) throw new EngineInputError(`${subregion.label}: ${issue.message}`);
      for (const { rule, key, state } of states) {
        // with double truncation each of A, B and A∪B is cut at its own √n/(4π) (server/engine/README.md §15)
        const entropyOf = (elements: Int32Array) => {
          if (hooks.shouldCancel?.()) throw new CancelledError('entropy');
          const e = entanglementEntropy(state, elements, { doubleTruncation: rule.doubleTruncation, restrictedCut: rule.restrictedCut, backend });
          hooks.onProgress?.('entropy', ++done / total);
          return e;
        };
        const mi = mutualInformation(entropyOf, a, b);
        const renyi = { a: renyiOf(mi.a), b: renyiOf(mi.b), union: renyiOf(mi.union) };
        const renyiI = renyi.union
          ? Object.fromEntries(Object.entries(renyi.union).map(([k, sab]) => [k, renyi.a![k]! + renyi.b![k]! - sab]))
          : undefined;
        entropies.push({
          subregion: subregion.key,
          rule: key,
          n: mi.union.n,
          S: mi.union.S,
          modesKept: mi.union.modesKept,
          cutoff: mi.union.cutoff,
          ...(renyi.union ? { renyi: renyi.union } : {}),
          pair: {
            size: subregion.pair!.size,
            separation: subregion.pair!.separation,
            SA: mi.a.S,
            SB: mi.b.S,
            SAB: mi.union.S,
            I: mi.I,
            nA: mi.a.n,
            nB: mi.b.n,
            ...(renyiI ? { renyiI } : {}),
          },
        });
        await new Promise((resolve) => setImmediate(resolve));
      }
      continue;
    }
    const elements = placed.relation ? listedElements(subregion, size) : elementsOf(subregion, engineSubregion(subregion));
    if (elements.length < 2) {
      throw new EngineInputError(`${subregion.label} holds ${elements.length} element(s) in this ${spec.imported ? 'causal set' : 'sprinkling'}; the entropy needs at least 2`);
    }
    for (const { rule, key, state } of states) {
      if (hooks.shouldCancel?.()) throw new CancelledError('entropy');
      const e = entanglementEntropy(state, elements, { doubleTruncation: rule.doubleTruncation, restrictedCut: rule.restrictedCut, backend });
      const renyi = renyiOf(e);
      entropies.push({ subregion: subregion.key, rule: key, n: e.n, S: e.S, modesKept: e.modesKept, cutoff: e.cutoff, ...(renyi ? { renyi } : {}) });
      hooks.onProgress?.('entropy', ++done / total);
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

/** The engine's view of the cell's elements, validated and placed as a run on them would be. */
function cellPointSource(spec: StudyCellSpec): PointSource {
  const imported = spec.imported;
  if (!imported) return { kind: 'sprinkling', sprinkling: spec.sprinkling! };
  const density = imported.density !== null ? { density: imported.density } : {};
  if (imported.kind === 'order') return { kind: 'order', causal: imported.causal, count: imported.count, dimension: imported.dimension, ...density };
  // with the region, ρ = N/V and a cylinder's periodic x come from it, as for a run on the same set
  return { kind: 'points', points: imported.points, dimension: imported.dimension, ...(imported.region ? { region: imported.region } : density) };
}

/** The element list of a subregion on a set without coordinates (a diamond needs coordinates). */
function listedElements(subregion: ResolvedSubregion, count: number): Int32Array {
  if (!subregion.elements) throw new EngineInputError(`${subregion.label}: a causal set given by its relation needs the subregion as a list of elements`);
  const missing = subregion.elements.find((i) => i >= count);
  if (missing !== undefined) throw new EngineInputError(`${subregion.label}: element ${missing} does not exist (the causal set has ${count} elements)`);
  return Int32Array.from(new Set(subregion.elements)).sort();
}
