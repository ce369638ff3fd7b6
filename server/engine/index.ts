import {
  regionSpecSchema,
  restrictedCutSchema,
  ruleCautions,
  sprinklingSpecSchema,
  subregionSpecSchema,
  truncationRuleSchema,
  type RegionSpec,
  type RestrictedCut,
  type SprinklingSpecInput,
  type SubregionSpec,
  type TruncationRule,
  type VacuumStage,
} from '../../shared/vacuum';
import { entanglementEntropy, subregionElements, type EntropyResult } from './entropy';
import { diamondPlacementIssue, elementListIssue, tipCoordinates } from './subregionCheck';
import { retardedGreenOperator } from './green';
import { backendSelection, getBackend, type BackendPreference } from './linalg';
import type { BackendName, LinearAlgebraBackend } from './linalg/backend';
import { BitRelation, causalMatrix, linkMatrix } from './order';
import { pauliJordan, pauliJordanSpectrum } from './pauliJordan';
import { makeRegion, type Region } from './regions';
import { sjDiagnostics, sjState, type SjDiagnostics, type SjState } from './sjState';
import { sprinkle, type Sprinkling } from './sprinkle';
import { applyTruncation, type KneeFit } from './truncation';
import { STRUCTURED_MAX_N_2D, structuredUnsupportedReason, type EngineChoice, type EngineName, type EngineRequest } from './structured/engineChoice';
import { engineForRequest, requestShape, structuredVacuum } from './structured/pipeline';

export { engineRequests, type EngineName, type EngineRequest } from './structured/engineChoice';

export const ENGINE_VERSION = 'tacet-engine 0.1.0';

export type { VacuumStage } from '../../shared/vacuum';
export type { EntropyResult } from './entropy';
export type { SjDiagnostics, SjState } from './sjState';
export type { KneeFit, TruncationResult } from './truncation';
export { continuumDiamondSpectrum } from './continuum';
export { sprinkle } from './sprinkle';
export { makeRegion } from './regions';
export { getBackend } from './linalg';

/**
 * Bad input to the engine: the message says what is wrong and is meant for the user; `field`, when
 * known, is the request setting at fault as a path into VacuumRequest ('subregion.indices',
 * 'subregion.future', 'truncation.count', 'engine', …), which the API reports as the issue's path.
 */
export class EngineInputError extends Error {
  override readonly name = 'EngineInputError';
  constructor(
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

/** Thrown between stages when `shouldCancel()` returns true. */
export class CancelledError extends Error {
  override readonly name = 'CancelledError';
  readonly stage: VacuumStage;
  constructor(stage: VacuumStage) {
    super(`computation cancelled before stage "${stage}"`);
    this.stage = stage;
  }
}

export type PointSource =
  | { kind: 'sprinkling'; sprinkling: SprinklingSpecInput }
  | {
      kind: 'points';
      /** flat coordinates, `dimension` per element */
      points: ArrayLike<number>;
      dimension: 2 | 4;
      /** ρ; or give the region the points were drawn in, then ρ = N/V */
      density?: number;
      region?: RegionSpec;
    }
  | {
      /** a causal set given by its order alone (an imported relation list): no coordinates */
      kind: 'order';
      /**
       * the transitively closed relation, bit-packed like BitRelation: ⌈count/32⌉ uint32 words per
       * row, bit j of row i set iff i ≺ j
       */
      causal: Uint32Array;
      count: number;
      /** chooses the Green function (2D: ½Cᵀ, 4D: from the links) */
      dimension: 2 | 4;
      /** ρ, needed for a massive field and in 4D */
      density?: number;
    };

export interface VacuumRequest {
  source: PointSource;
  mass?: number;
  truncation?: TruncationRule;
  subregion?: SubregionSpec;
  doubleTruncation?: boolean;
  /** the second cut of double truncation (default √n/(4π)); only with doubleTruncation */
  restrictedCut?: RestrictedCut;
  backend?: BackendPreference | LinearAlgebraBackend;
  /** also return the SJ state (kept eigenvectors and Δ) for further use (dense engine only) */
  keepState?: boolean;
  /** dense, structured (2D, modes above a cut only) or auto: the rule in structured/engineChoice.ts */
  engine?: EngineRequest;
}

export interface VacuumHooks {
  onProgress?(stage: VacuumStage, fraction: number): void;
  shouldCancel?(): boolean;
}

/**
 * Runs one stage of a computation: checks `shouldCancel()` before it (throws CancelledError), reports
 * progress 0 and 1, records its seconds in `timings`, and yields to the event loop first so a cancel
 * request or a progress write can get through.
 */
export function stageRunner(hooks: VacuumHooks, timings: Partial<Record<VacuumStage, number>>) {
  return async <T>(name: VacuumStage, work: () => T): Promise<T> => {
    if (hooks.shouldCancel?.()) throw new CancelledError(name);
    hooks.onProgress?.(name, 0);
    await new Promise((resolve) => setImmediate(resolve));
    if (hooks.shouldCancel?.()) throw new CancelledError(name);
    const start = performance.now();
    const value = work();
    timings[name] = (performance.now() - start) / 1000;
    hooks.onProgress?.(name, 1);
    return value;
  };
}

export interface VacuumResult {
  engineVersion: string;
  /** which engine ran, and why (structured: `eigenvalues` holds only the computed modes above the cut) */
  engine: EngineName;
  engineReason: string;
  backend: string;
  dimension: 2 | 4;
  N: number;
  points: Float64Array;
  /** ρ, null when neither a density nor a region was known */
  density: number | null;
  volume: number | null;
  region: RegionSpec | null;
  sprinkling: Sprinkling['provenance'] | null;
  mass: number;
  relations: number;
  links: number | null;
  /** all positive eigenvalues of iΔ, descending */
  eigenvalues: Float64Array;
  truncation: TruncationRule;
  cutoff: number;
  modesKept: number;
  knee: KneeFit | null;
  diagnostics: SjDiagnostics;
  entropy: (EntropyResult & { elements: Int32Array }) | null;
  /** cautions for the rule used on this dimension (shared/vacuum.ts ruleCautions), to show beside the result */
  cautions: string[];
  /** seconds per stage */
  timings: Partial<Record<VacuumStage, number>>;
  state?: SjState;
}

/**
 * Largest N the dense pipeline accepts, per backend. It holds about 7 N × N float64 matrices at once
 * (K, Δ, ΔᵀΔ, its eigenvectors, the solver's working copy, products with the kept basis; LAPACK's
 * dsyevd adds about 2 N² of workspace): 7 × 8 × N² bytes is 0.5 GB at N = 3000 and 2.0 GB at N = 6000
 * (measured peak resident set: 0.32 GB at N = 2000, 0.96 GB at N = 4000 on native).
 * - ml-matrix: 3000 — its pure-JavaScript eigensolver already takes tens of minutes there.
 * - native (LAPACK dsyevd on OpenBLAS, N³ growth from ≈ 6.5 s at N = 4000 on two free cores): 6000,
 *   about 25 s for the eigendecomposition and under a minute for a whole run, ≈ 2–3 GB of memory;
 *   N = 8000 would need ≈ 5 GB per running job, too much beside other jobs on a team server.
 */
export const DENSE_SIZE_LIMITS: Readonly<Record<BackendName, number>> = { native: 6000, 'ml-matrix': 3000 };

export function denseSizeLimit(backend: BackendName = backendSelection().name): number {
  return DENSE_SIZE_LIMITS[backend];
}

const autoDenseLimit = denseSizeLimit();

/** The limit for runs on this process's automatic backend (native when its addon loads). */
export const DENSE_SIZE_LIMIT = {
  maxN: autoDenseLimit,
  matricesHeld: 7,
  backend: backendSelection().name,
  reason: `the dense pipeline holds about 7 N×N float64 matrices at once (≈${((7 * 8 * autoDenseLimit ** 2) / 1e9).toFixed(1)} GB at N = ${autoDenseLimit})`,
} as const;

export function denseMemoryBytes(n: number): number {
  return DENSE_SIZE_LIMIT.matricesHeld * 8 * n * n;
}

/** Throws EngineInputError when N exceeds the dense limit. */
export function checkDenseSize(n: number, maxN: number = DENSE_SIZE_LIMIT.maxN): void {
  if (n > maxN) {
    throw new EngineInputError(
      `N = ${n} exceeds the dense limit of ${maxN} elements: ${DENSE_SIZE_LIMIT.reason}; it would need about ${(denseMemoryBytes(n) / 2 ** 30).toFixed(1)} GB`,
    );
  }
  if (n < 2) throw new EngineInputError(`a causal set needs at least 2 elements, got ${n}`);
}

/**
 * The engine the rule picks for a request and that engine's size limit. A request only the dense engine
 * can serve (no cut, knee, 4D, cylinder) that is over the dense limit is refused with the dense engine's
 * memory reason and why the structured engine cannot take it.
 */
function engineAndLimit(request: VacuumRequest, denseMaxN: number): { choice: EngineChoice; maxN: number } {
  try {
    const choice = engineForRequest(request, denseMaxN);
    return { choice, maxN: choice.engine === 'structured' ? STRUCTURED_MAX_N_2D : denseMaxN };
  } catch (error) {
    const shape = request.source.kind === 'order' ? null : requestShape(request);
    if (shape && request.engine !== 'structured') {
      const truncation: TruncationRule = request.truncation ?? (request.doubleTruncation ? { rule: 'sqrtN' } : { rule: 'none' });
      const unsupported = structuredUnsupportedReason(shape.dimension, truncation, shape.periodic);
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
      const truncation: TruncationRule = request.truncation ?? (request.doubleTruncation ? { rule: 'sqrtN' } : { rule: 'none' });
      if (!shape || structuredUnsupportedReason(shape.dimension, truncation, shape.periodic)) throw new EngineInputError(error.message, 'engine');
    }
    throw error;
  }
}

/** The size limit of the engine the rule picks for a request (structured: STRUCTURED_MAX_N_2D). */
function sizeLimitFor(request: VacuumRequest): number {
  return engineAndLimit(request, DENSE_SIZE_LIMIT.maxN).maxN;
}

/**
 * Validates a request before any work: schemas, consistency (density for massive or 4D fields,
 * subregion dimension) and the dense size limit — for Poisson sprinklings the expected N plus five
 * standard deviations. Throws EngineInputError with a message for the user.
 */
export function validateVacuumRequest(request: VacuumRequest, maxN: number = sizeLimitFor(request)): void {
  const fail = (message: string, field?: string): never => {
    throw new EngineInputError(message, field);
  };
  const zodMessage = (e: { issues: { path: PropertyKey[]; message: string }[] }) =>
    e.issues.map((i) => (i.path.length ? `${i.path.join('.')}: ${i.message}` : i.message)).join('; ');
  let dimension: 2 | 4;
  let hasDensity: boolean;
  // N, or for a Poisson sprinkling its largest plausible value; and the region the points lie in
  let size: { n: number; exact: boolean };
  let placedIn: RegionSpec | null = null;
  if (request.source.kind === 'sprinkling') {
    const parsed = sprinklingSpecSchema.safeParse(request.source.sprinkling);
    if (!parsed.success) return fail(`invalid sprinkling: ${zodMessage(parsed.error)}`);
    const region = makeRegion(parsed.data.region);
    dimension = region.dimension;
    hasDensity = true;
    const mean = parsed.data.count ?? (parsed.data.density as number) * region.volume;
    const worst = parsed.data.process === 'fixed' ? mean : Math.ceil(mean + 5 * Math.sqrt(mean));
    if (worst > maxN) checkDenseSize(worst, maxN);
    if (parsed.data.process === 'fixed' && mean < 2) fail('a sprinkling needs at least 2 elements');
    size = { n: worst, exact: parsed.data.process === 'fixed' };
    placedIn = parsed.data.region;
  } else if (request.source.kind === 'order') {
    const { causal, count, dimension: d, density } = request.source;
    if (d !== 2 && d !== 4) fail(`dimension must be 2 or 4, got ${String(d)}`);
    dimension = d;
    if (!Number.isInteger(count)) fail(`the element count must be a whole number, got ${count}`);
    checkDenseSize(count, maxN);
    size = { n: count, exact: true };
    const words = (count + 31) >>> 5;
    if (causal.length !== words * count) fail(`a relation on ${count} elements has ${words * count} words, got ${causal.length}`);
    for (let i = 0; i < count; i++) {
      if (causal[i * words + (i >>> 5)] & (1 << (i & 31))) fail(`element ${i} precedes itself; a causal order is irreflexive`);
    }
    if (density !== undefined && !(density > 0 && Number.isFinite(density))) fail('density must be a positive number');
    hasDensity = density !== undefined;
    if (request.subregion?.kind === 'diamond') {
      fail('a causal set given by its relation has no coordinates: give the subregion as a list of elements', 'subregion');
    }
  } else {
    const { points, dimension: d } = request.source;
    if (d !== 2 && d !== 4) fail(`dimension must be 2 or 4, got ${String(d)}`);
    dimension = d;
    if (points.length % d !== 0) fail(`${points.length} coordinates do not make whole ${d}D points`);
    for (let k = 0; k < points.length; k++) {
      if (!Number.isFinite(points[k])) fail(`coordinate ${k % d} of element ${Math.floor(k / d)} is not a finite number`);
    }
    checkDenseSize(points.length / d, maxN);
    size = { n: points.length / d, exact: true };
    if (request.source.density !== undefined && !(request.source.density > 0 && Number.isFinite(request.source.density))) {
      fail('density must be a positive number');
    }
    if (request.source.region) {
      const parsed = regionSpecSchema.safeParse(request.source.region);
      if (!parsed.success) return fail(`invalid region: ${zodMessage(parsed.error)}`);
      if (makeRegion(parsed.data).dimension !== d) fail(`region ${parsed.data.kind} is not ${d}-dimensional`);
      placedIn = parsed.data;
    }
    hasDensity = request.source.density !== undefined || request.source.region !== undefined;
  }
  const mass = request.mass ?? 0;
  if (!(mass >= 0) || !Number.isFinite(mass)) fail('mass must be a finite number ≥ 0', 'mass');
  if (!hasDensity && (mass > 0 || dimension === 4)) {
    fail(`${mass > 0 ? 'a massive field' : 'the 4D Green function'} needs a density: give the density or the region`);
  }
  if (request.truncation) {
    const parsed = truncationRuleSchema.safeParse(request.truncation);
    if (!parsed.success) return fail(`invalid truncation: ${zodMessage(parsed.error)}`, 'truncation');
    // iΔ is real antisymmetric: its nonzero eigenvalues come in ± pairs, at most ⌊N/2⌋ positive (common practice)
    const pairs = Math.floor(size.n / 2);
    if (parsed.data.rule === 'modes' && parsed.data.count > pairs) {
      fail(`modes:${parsed.data.count} asks for more positive eigenvalues of iΔ than ${size.exact ? '' : 'about '}${size.n} elements can have (at most ${pairs})`, 'truncation.count');
    }
    if (parsed.data.rule === 'knee' && pairs < 4) fail(`the knee finder needs at least 4 positive eigenvalues of iΔ; ${size.n} elements have at most ${pairs}`, 'truncation');
  }
  if (request.subregion) {
    const parsed = subregionSpecSchema.safeParse(request.subregion);
    if (!parsed.success) return fail(`invalid subregion: ${zodMessage(parsed.error)}`, 'subregion');
    if (parsed.data.kind === 'diamond' && (('y' in parsed.data.past ? 4 : 2) !== dimension || ('y' in parsed.data.future ? 4 : 2) !== dimension)) {
      fail(`subregion tips must have ${dimension} coordinates like the points`, 'subregion');
    }
    // A Poisson sprinkling draws its N in the worker: a label below the plausible maximum may or may not
    // exist, and whether a diamond holds two elements depends on the points; both are checked again there.
    const issue =
      parsed.data.kind === 'elements'
        ? elementListIssue(parsed.data.indices, size.n, size.exact)
        : diamondPlacementIssue(tipCoordinates(parsed.data.past), tipCoordinates(parsed.data.future), placedIn);
    if (issue) fail(issue.message, issue.field ? `subregion.${issue.field}` : 'subregion');
    if (parsed.data.kind === 'diamond' && request.source.kind === 'points') {
      const held = subregionElements(parsed.data, request.source.points, dimension, placedIn ? makeRegion(placedIn).periodX : undefined).length;
      if (held < 2) fail(`the subregion holds ${held} of the ${size.n} elements; the entropy needs at least 2`, 'subregion');
    }
  }
  if (request.doubleTruncation && !request.subregion) fail('double truncation needs a subregion', 'doubleTruncation');
  if (request.restrictedCut !== undefined) {
    if (!request.doubleTruncation) fail('restrictedCut: a restricted cut applies only with double truncation (doubleTruncation: true)');
    const parsed = restrictedCutSchema.safeParse(request.restrictedCut);
    if (!parsed.success) fail(`invalid restrictedCut: ${zodMessage(parsed.error)}`);
  }
}

function relationFromWords(words: Uint32Array, count: number): BitRelation {
  const relation = new BitRelation(count);
  relation.words.set(words);
  return relation;
}

/**
 * A labelling that respects ≺, from the relation alone: i ≺ j makes the past of j strictly larger
 * than the past of i (it holds i and all of i's past, the relation being transitive), so sorting by
 * the size of the past is a linear extension.
 */
function linearExtension(causal: BitRelation): Int32Array {
  const pastSize = new Int32Array(causal.size);
  causal.forEach((_i, j) => {
    pastSize[j] += 1;
  });
  return Int32Array.from({ length: causal.size }, (_, i) => i).sort((a, b) => pastSize[a] - pastSize[b] || a - b);
}

/** The element list of a subregion on a set without coordinates (validation refuses diamonds there). */
function listedElements(spec: SubregionSpec, count: number): Int32Array {
  if (spec.kind !== 'elements') throw new EngineInputError('a causal set given by its relation needs the subregion as a list of elements');
  const unique = Array.from(new Set(spec.indices)).sort((a, b) => a - b);
  const missing = unique.find((i) => i >= count);
  if (missing !== undefined) throw new EngineInputError(`subregion element ${missing} does not exist (the causal set has ${count} elements)`);
  return Int32Array.from(unique);
}

function resolveBackend(choice: VacuumRequest['backend']): LinearAlgebraBackend {
  if (choice === undefined || typeof choice === 'string') return getBackend(choice ?? 'auto');
  return choice;
}

/**
 * The whole dense pipeline of server/engine/README.md §1–§11: sprinkle (or take the given points), causal order,
 * retarded Green function, Pauli–Jordan spectrum, (truncated) SJ state with its diagnostics, and the
 * entanglement entropy of a subregion when one is given. Reports progress per stage and checks
 * `shouldCancel()` before each stage (throws CancelledError).
 */
export async function computeVacuum(request: VacuumRequest, hooks: VacuumHooks = {}): Promise<VacuumResult> {
  const backend = resolveBackend(request.backend);
  const denseLimit = denseSizeLimit(backend.name);
  const { choice, maxN: sizeLimit } = engineAndLimit(request, denseLimit);
  validateVacuumRequest(request, sizeLimit);
  const timings: Partial<Record<VacuumStage, number>> = {};
  const stage = stageRunner(hooks, timings);

  const source = request.source;
  const placed = await stage('sprinkle', () => {
    if (source.kind === 'sprinkling') {
      const s = sprinkle(sprinklingSpecSchema.parse(source.sprinkling));
      checkDenseSize(s.count, sizeLimit);
      return { points: s.points, dimension: s.dimension, n: s.count, density: s.density as number | null, region: s.region as Region | null, provenance: s.provenance as Sprinkling['provenance'] | null };
    }
    if (source.kind === 'order') {
      return { points: new Float64Array(0), dimension: source.dimension, n: source.count, density: source.density ?? null, region: null, provenance: null };
    }
    const points = Float64Array.from(source.points);
    const region = source.region ? makeRegion(regionSpecSchema.parse(source.region)) : null;
    if (region) {
      const d = source.dimension;
      for (let i = 0; i < points.length / d; i++) {
        if (!region.contains(points.subarray(i * d, (i + 1) * d))) {
          throw new EngineInputError(`element ${i} lies outside the ${region.spec.kind} region`);
        }
      }
    }
    const n = points.length / source.dimension;
    const density = source.density ?? (region ? n / region.volume : null);
    return { points, dimension: source.dimension, n, density, region, provenance: null };
  });
  // a Poisson sprinkling's N is known only now: the labels below its plausible maximum are checked here
  if (request.subregion?.kind === 'elements') {
    const issue = elementListIssue(request.subregion.indices, placed.n, true);
    if (issue) throw new EngineInputError(issue.message, 'subregion.indices');
  }
  if (choice.engine === 'structured') return structuredVacuum({ request, hooks, placed, stage, backend, choice, timings });
  const { points, dimension, density, region, n } = placed;
  const mass = request.mass ?? 0;

  const order = await stage('order', () => {
    const causal = source.kind === 'order' ? relationFromWords(source.causal, n) : causalMatrix(points, dimension, region?.periodX);
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
      linearExtension: source.kind === 'order' && mass > 0 ? linearExtension(order.causal) : undefined,
      // on the cylinder K counts the images through which a pair is related, not just whether it is
      periodX: region?.periodX,
    }),
  );

  const { delta, spectrum } = await stage('spectrum', () => {
    const delta = pauliJordan(k);
    return { delta, spectrum: pauliJordanSpectrum(delta, { backend }) };
  });

  const truncationRule = request.truncation ?? (request.doubleTruncation ? { rule: 'sqrtN' as const } : { rule: 'none' as const });
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
      const elements = source.kind === 'order' ? listedElements(subregion, n) : subregionElements(subregion, points, dimension, region?.periodX);
      if (elements.length < 2) {
        throw new EngineInputError(`the subregion holds ${elements.length} element(s); the entropy needs at least 2`);
      }
      return { ...entanglementEntropy(state, elements, { doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut, backend }), elements };
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
    relations: order.causal.count(),
    links: order.links ? order.links.count() : null,
    eigenvalues: spectrum.positive,
    truncation: truncationRule,
    cutoff: truncation.cutoff,
    modesKept: truncation.modesKept,
    knee: truncation.knee ?? null,
    diagnostics,
    entropy,
    cautions: ruleCautions(
      dimension,
      { truncation: truncationRule, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut },
      { modes: truncation.modesKept, of: spectrum.positive.length },
    ),
    timings,
    ...(request.keepState ? { state } : {}),
  };
}
