import type { CreateStudyRequest, ImportedStudyRequest, ResolvedSubregion, SprinkledStudyRequest, StudyCausalSet } from '@shared/studies';
import { STUDY_MIN_SUBREGION_ELEMENTS, studyRuleKey, studyRuleLabel } from '@shared/studies';
import type { Event, RegionSpec, SprinklingSpecInput, SubregionSpec } from '@shared/vacuum';
import { subregionElements } from '../engine/entropy';
import { concentricTips, regionOwnDiamond, type DiamondTips } from '@shared/regions';
import { makeRegion } from '../engine/regions';
import { diamondPlacementIssue } from '../engine/subregionCheck';

/** A study request that cannot be computed as asked; the message is meant for the user. */
export class StudyPlanError extends Error {
  override readonly name = 'StudyPlanError';
  constructor(
    message: string,
    /** the request field the message is about, joined by '.' as in API errors */
    readonly path: string,
  ) {
    super(message);
  }
}

type Tips = DiamondTips;

const coordinates = (e: Event): number[] => ('y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x]);

/** Spacetime volume of the causal diamond between two tips: τ²/2 in 2D, πτ⁴/24 in 4D (server/engine/README.md §2). */
export function diamondVolume(tips: Tips): number {
  const p = coordinates(tips.past);
  const q = coordinates(tips.future);
  const dt = q[0]! - p[0]!;
  const dx2 = q.slice(1).reduce((s, v, k) => s + (v - p[k + 1]!) ** 2, 0);
  const tau2 = dt * dt - dx2;
  if (!(dt > 0 && tau2 > 0)) return 0;
  return p.length === 4 ? (Math.PI * tau2 * tau2) / 24 : tau2 / 2;
}

const formatFraction = (f: number) => String(Number(f.toPrecision(6)));

/** A region the points lie in (null: points with a density only), and whose points, for messages. */
interface PlacedIn {
  region: RegionSpec | null;
  /** the imported causal set it belongs to */
  name?: string;
}

/**
 * Where a sub-diamond by tips is refused: the rule of the engine's diamondPlacementIssue (the same one
 * runs use: future tip inside the future light cone of the past tip, periodic x on the cylinder, both
 * tips in the closed region, a sub-diamond partly outside a slab refused), checked for every region.
 */
function tipsProblem(d: Tips, dimension: 2 | 4, placements: PlacedIn[]): { message: string; field: string } | null {
  if (('y' in d.past ? 4 : 2) !== dimension || ('y' in d.future ? 4 : 2) !== dimension) {
    const like = placements.some((p) => p.region) ? 'region' : 'points';
    return { message: `the tips must have ${dimension === 2 ? 't, x' : 't, x, y, z'} coordinates like the ${like}`, field: '' };
  }
  for (const { region, name } of placements) {
    const issue = diamondPlacementIssue(coordinates(d.past), coordinates(d.future), region, region && name ? `the ${region.kind} region of "${name}"` : undefined);
    if (issue) return { message: issue.message, field: issue.field };
  }
  return null;
}

const toEvent = (c: number[]): Event => (c.length === 4 ? { t: c[0]!, x: c[1]!, y: c[2]!, z: c[3]! } : { t: c[0]!, x: c[1]! });

/** A pair subregion's two sub-diamonds as the engine takes them; null for any other subregion. */
export function pairSubregions(subregion: ResolvedSubregion): { a: SubregionSpec; b: SubregionSpec } | null {
  if (!subregion.pair) return null;
  return { a: { kind: 'diamond', ...subregion.pair.a }, b: { kind: 'diamond', ...subregion.pair.b } };
}

/** The key of a pair: `pair l/L=0.2 d/L=0.1`. */
export const pairKey = (size: number, separation: number) => `pair l/L=${formatFraction(size)} d/L=${formatFraction(separation)}`;

/**
 * Two equal sub-diamonds of proper time ℓ = size·T in the region's own diamond (tips `own`, proper time
 * T), centred on its central slice and symmetric about its centre, with a gap d = separation·T between
 * their facing corners: centres c ± (ℓ + d)/2 ê, ê the unit spacelike direction orthogonal to the
 * diamond's axis in 2D (the x axis in its rest frame; x itself for the centred 4D diamond). Both lie in
 * the diamond when 2ℓ + d ≤ T (the outer corners at (ℓ + d/2) from the centre, the diamond's half-width
 * T/2); their bases are disjoint intervals (balls) of one slice, so A and B are spacelike to each other.
 * On the cylinder the gap the other way round, C − 2ℓ − d, must be at least d too, or d would not be
 * the distance between them. Throws StudyPlanError naming the separation (or size) that does not fit.
 */
function pairTips(region: RegionSpec, own: Tips, size: number, separation: number, k: { size: number; separation: number }): NonNullable<ResolvedSubregion['pair']> {
  const p = coordinates(own.past);
  const q = coordinates(own.future);
  const axis = q.map((v, i) => v - p[i]!);
  const L = Math.sqrt(axis[0]! ** 2 - axis.slice(1).reduce((s, v) => s + v * v, 0));
  const unitAxis = axis.map((v) => v / L);
  // in 2D (u_t, u_x) → (u_x, u_t) is orthogonal to the axis and spacelike of unit norm; 4D diamonds are centred on the t axis
  const across = p.length === 2 ? [unitAxis[1]!, unitAxis[0]!] : [0, 1, 0, 0];
  const centre = p.map((v, i) => (v + q[i]!) / 2);
  const ell = size * L;
  const d = separation * L;
  const where = `the pair ℓ/T = ${formatFraction(size)}, d/T = ${formatFraction(separation)}`;
  if (2 * ell + d > L * (1 + 1e-12)) {
    throw new StudyPlanError(
      `${where} does not fit in the region's diamond: two sub-diamonds and their gap span 2ℓ + d = ${formatFraction(2 * size + separation)} T across its central slice, at most T; take a smaller d/T or ℓ/T`,
      `subregions.separations.${k.separation}`,
    );
  }
  if (region.kind === 'cylinder2d') {
    const other = region.circumference - 2 * ell - d;
    if (other < d) {
      throw new StudyPlanError(
        `${where} on the cylinder of circumference ${formatFraction(region.circumference)}: the gap the other way round (C − 2ℓ − d = ${formatFraction(other)}) must be at least d = ${formatFraction(d)}, or the two sub-diamonds are closer that way than d says; take a smaller d/T or ℓ/T`,
        `subregions.separations.${k.separation}`,
      );
    }
  }
  const offset = (ell + d) / 2;
  const tipsAt = (sign: number) => {
    const c = centre.map((v, i) => v + sign * offset * across[i]!);
    return { past: toEvent(c.map((v, i) => v - (ell / 2) * unitAxis[i]!)), future: toEvent(c.map((v, i) => v + (ell / 2) * unitAxis[i]!)) };
  };
  return { size, separation, a: tipsAt(-1), b: tipsAt(1) };
}

/** Every (size, separation) pair of a `pairs` request in the region's own diamond, sizes outermost. */
function pairsSubregions(region: RegionSpec, subregions: Extract<CreateStudyRequest['subregions'], { kind: 'pairs' }>): ResolvedSubregion[] {
  const own = regionOwnDiamond(region);
  if (!own) throw new StudyPlanError('pairs of sub-diamonds need a diamond region (they sit on its central slice); give a 2D, 4D or cylinder diamond', 'subregions.kind');
  return subregions.sizes.flatMap((size, i) =>
    subregions.separations.map((separation, j) => ({
      key: pairKey(size, separation),
      label: `ℓ/T = ${formatFraction(size)}, d/T = ${formatFraction(separation)}`,
      fraction: null,
      past: null,
      future: null,
      pair: pairTips(region, own, size, separation, { size: i, separation: j }),
    })),
  );
}

/** The request field of the k-th resolved subregion, for messages about it. */
function subregionPath(subregions: CreateStudyRequest['subregions'], resolved: ResolvedSubregion, k: number): string {
  if (subregions.kind === 'pairs') return `subregions.sizes.${subregions.sizes.indexOf(resolved.pair!.size)}`;
  if (subregions.kind === 'concentric') return `subregions.fractions.${k}`;
  if (subregions.kind === 'elements') return `subregions.lists.${k}.indices`;
  return `subregions.diamonds.${k}`;
}

function tipsSubregions(subregions: Extract<CreateStudyRequest['subregions'], { kind: 'tips' }>, dimension: 2 | 4, placements: PlacedIn[]): ResolvedSubregion[] {
  return subregions.diamonds.map((d, k) => {
    const problem = tipsProblem(d, dimension, placements);
    if (problem) throw new StudyPlanError(problem.message, `subregions.diamonds.${k}${problem.field ? `.${problem.field}` : ''}`);
    return { key: `d${k + 1}`, label: d.label ?? `sub-diamond ${k + 1}`, fraction: null, past: d.past, future: d.future };
  });
}

/**
 * The study's subregions with stable keys: `l/L=0.5` for concentric ones (in the order given),
 * `pair l/L=0.2 d/L=0.1` for pairs (each size with each separation), `d1`, `d2`, … for diamonds by tips. Throws StudyPlanError when they do not fit the region.
 */
export function resolveSubregions(request: Pick<SprinkledStudyRequest, 'region' | 'subregions'>): ResolvedSubregion[] {
  const region = makeRegion(request.region);
  const subregions = request.subregions;
  if (subregions.kind === 'concentric') {
    const tips = regionOwnDiamond(request.region);
    if (!tips) throw new StudyPlanError('concentric sub-diamonds need a diamond region; give sub-diamonds by their tips for a slab', 'subregions.kind');
    return subregions.fractions.map((f) => ({ key: `l/L=${formatFraction(f)}`, label: `ℓ/T = ${formatFraction(f)}`, fraction: f, ...concentricTips(tips, f) }));
  }
  if (subregions.kind === 'pairs') return pairsSubregions(request.region, subregions);
  if (subregions.kind === 'elements') throw new StudyPlanError('element lists are for imported causal sets', 'subregions.kind');
  return tipsSubregions(subregions, region.dimension, [{ region: request.region }]);
}

/** An imported causal set as planning sees it: its reference and, for a coordinates file, its points. */
export interface PlannedCausalSet {
  reference: StudyCausalSet;
  /** flat coordinates; null for a relation list */
  points: Float64Array | null;
}

const sameRegion = (a: RegionSpec | null, b: RegionSpec | null) => a !== null && b !== null && JSON.stringify(a) === JSON.stringify(b);

/**
 * Subregions of a study over imported causal sets. Concentric sub-diamonds need every set to be
 * coordinates imported with the same diamond region (ℓ/T is relative to it); sub-diamonds by tips
 * need coordinates of one dimension (checked against the region of every set imported with one); element
 * lists (keys `e1`, `e2`, …) fit any set with enough elements and are the only choice for relation lists.
 */
export function resolveImportedSubregions(request: Pick<ImportedStudyRequest, 'subregions'>, sets: PlannedCausalSet[]): ResolvedSubregion[] {
  const subregions = request.subregions;
  const dimension = sets[0]!.reference.dimension;
  const other = sets.find((s) => s.reference.dimension !== dimension);
  if (other) throw new StudyPlanError(`the causal sets mix ${dimension}D and ${other.reference.dimension}D ("${other.reference.name}"); a study takes one dimension`, 'causalSetIds');
  if (subregions.kind === 'elements') {
    const smallest = sets.reduce((best, s) => (s.reference.N < best.reference.N ? s : best), sets[0]!);
    return subregions.lists.map((list, k) => {
      const indices = [...list.indices].sort((a, b) => a - b);
      const beyond = indices.find((i) => i >= smallest.reference.N);
      if (beyond !== undefined) {
        throw new StudyPlanError(
          `element ${beyond} does not exist in "${smallest.reference.name}", which has ${smallest.reference.N} elements (labels 0 to ${smallest.reference.N - 1})`,
          `subregions.lists.${k}.indices`,
        );
      }
      return { key: `e${k + 1}`, label: list.label ?? `elements ${k + 1}`, fraction: null, past: null, future: null, elements: indices };
    });
  }
  const relational = sets.find((s) => s.reference.kind !== 'coordinates' || !s.points);
  if (relational) {
    throw new StudyPlanError(
      `"${relational.reference.name}" is a relation list without coordinates; give the subregions as element lists`,
      'subregions.kind',
    );
  }
  const common = sets.every((s) => sameRegion(s.reference.region, sets[0]!.reference.region)) ? sets[0]!.reference.region : null;
  if (subregions.kind === 'concentric' || subregions.kind === 'pairs') {
    const what = subregions.kind === 'concentric' ? 'concentric sub-diamonds' : 'pairs of sub-diamonds';
    const without = sets.find((s) => s.reference.region === null);
    if (without) {
      throw new StudyPlanError(
        `${what} need the region the points lie in; "${without.reference.name}" was imported with a density only: give tips or element lists`,
        'subregions.kind',
      );
    }
    if (!common) throw new StudyPlanError(`${what} need every causal set imported with the same region; give tips or element lists`, 'subregions.kind');
    return resolveSubregions({ region: common, subregions });
  }
  // every distinct region of the sets (or none, for sets imported with a density only) must hold the tips
  const placements = new Map(sets.map((s) => [JSON.stringify(s.reference.region), { region: s.reference.region, name: s.reference.name }]));
  return tipsSubregions(subregions, dimension, [...placements.values()]);
}

/** The subregion as the engine takes it. */
export function engineSubregion(subregion: ResolvedSubregion): SubregionSpec {
  if (subregion.elements) return { kind: 'elements', indices: subregion.elements };
  if (!subregion.past || !subregion.future) throw new Error(`subregion ${subregion.key} has neither tips nor elements`);
  return { kind: 'diamond', past: subregion.past, future: subregion.future };
}

/**
 * Expected elements of a subregion at N elements in the region: N × (volume ratio); for a pair, of each
 * of its two (equal) sub-diamonds.
 */
export function expectedSubregionElements(request: Pick<SprinkledStudyRequest, 'region'>, subregion: ResolvedSubregion, count: number): number {
  const tips = subregion.pair ? subregion.pair.a : subregion.past && subregion.future ? { past: subregion.past, future: subregion.future } : null;
  if (!tips) throw new Error(`subregion ${subregion.key} is not a diamond`);
  // a curved region's sub-diamond holds ∫√−g of it, not the flat τ²/2 (server/engine/README.md §17)
  const region = makeRegion(request.region);
  const volume = region.subDiamondVolume ? region.subDiamondVolume(coordinates(tips.past), coordinates(tips.future)) : diamondVolume(tips);
  return (count * volume) / region.volume;
}

/** One sprinkling of the study: requested count and seed, in the order the jobs are queued. */
export interface PlannedCell {
  position: number;
  count: number;
  seed: string;
}

/**
 * The grid of sprinklings, smallest N first and seeds round-robin inside, so the first results
 * arrive early and partial aggregates cover every N soon. Checks each subregion holds at least
 * STUDY_MIN_SUBREGION_ELEMENTS elements on average at the smallest N.
 */
export function planCells(request: SprinkledStudyRequest, subregions: ResolvedSubregion[]): PlannedCell[] {
  const counts = [...request.counts].sort((a, b) => a - b);
  const smallest = counts[0]!;
  subregions.forEach((s, k) => {
    const expected = expectedSubregionElements(request, s, smallest);
    if (expected < STUDY_MIN_SUBREGION_ELEMENTS) {
      const what = s.pair ? `each sub-diamond of the pair ${s.label}` : s.label;
      throw new StudyPlanError(
        `${what} holds about ${expected.toFixed(1)} elements at N = ${smallest}; at least ${STUDY_MIN_SUBREGION_ELEMENTS} are needed for an entropy`,
        subregionPath(request.subregions, s, k),
      );
    }
  });
  const cells: PlannedCell[] = [];
  for (const count of counts) for (const seed of request.seeds) cells.push({ position: cells.length, count, seed });
  return cells;
}

/**
 * The cells of a study over imported causal sets: one per set, its seed the set's id, smallest N
 * first (sets of equal N in the order picked). Checks that every diamond subregion holds at least
 * STUDY_MIN_SUBREGION_ELEMENTS elements in every set, counting them on the set's own points.
 */
export function planImportedCells(sets: PlannedCausalSet[], subregions: ResolvedSubregion[], request?: Pick<ImportedStudyRequest, 'subregions'>): PlannedCell[] {
  const ordered = sets.map((s, k) => ({ s, k })).sort((a, b) => a.s.reference.N - b.s.reference.N || a.k - b.k);
  for (const { s } of ordered) {
    if (!s.points) continue;
    const periodX = s.reference.region ? makeRegion(s.reference.region).periodX : undefined;
    subregions.forEach((sub, k) => {
      if (sub.elements) return;
      const pair = pairSubregions(sub);
      const held = Math.min(...(pair ? [pair.a, pair.b] : [engineSubregion(sub)]).map((spec) => subregionElements(spec, s.points!, s.reference.dimension, periodX).length));
      if (held < STUDY_MIN_SUBREGION_ELEMENTS) {
        const path = request ? subregionPath(request.subregions, sub, k) : sub.fraction !== null ? `subregions.fractions.${k}` : `subregions.diamonds.${k}`;
        throw new StudyPlanError(
          `${pair ? `a sub-diamond of the pair ${sub.label}` : sub.label} holds ${held} element${held === 1 ? '' : 's'} of "${s.reference.name}" (N = ${s.reference.N}); at least ${STUDY_MIN_SUBREGION_ELEMENTS} are needed for an entropy`,
          path,
        );
      }
    });
  }
  return ordered.map(({ s }, position) => ({ position, count: s.reference.N, seed: s.reference.id }));
}

/**
 * Refuses cut rules no cell of the study can take: iΔ of N elements has at most ⌊N/2⌋ positive
 * eigenvalues (they come in ± pairs, common practice), so modes:K needs K ≤ ⌊N/2⌋ and the knee finder
 * 4 of them. `smallestN` is the smallest N of the study; for Poisson sprinklings (`exact` false) its
 * largest plausible value, so only what no draw can serve is refused.
 */
export function checkRulesFit(rules: Pick<CreateStudyRequest, 'rules'>['rules'], smallestN: number, exact: boolean): void {
  const pairs = Math.floor(smallestN / 2);
  const about = exact ? '' : 'about ';
  rules.forEach((rule, k) => {
    const t = rule.truncation;
    if (t.rule === 'modes' && t.count > pairs) {
      throw new StudyPlanError(`modes:${t.count} asks for more positive eigenvalues of iΔ than the ${about}${smallestN} elements of the smallest N can have (at most ${pairs})`, `rules.${k}.truncation.count`);
    }
    if (t.rule === 'knee' && pairs < 4) {
      throw new StudyPlanError(`the knee finder needs at least 4 positive eigenvalues of iΔ; the ${about}${smallestN} elements of the smallest N have at most ${pairs}`, `rules.${k}.truncation`);
    }
  });
}

/** The sprinkling of one cell. */
export function cellSprinkling(request: Pick<SprinkledStudyRequest, 'region' | 'process' | 'prng'>, count: number, seed: string): SprinklingSpecInput {
  return { region: request.region, process: request.process, count, seed, prng: request.prng };
}

export function ruleLabels(request: Pick<CreateStudyRequest, 'rules'>): Record<string, string> {
  return Object.fromEntries(request.rules.map((r) => [studyRuleKey(r), studyRuleLabel(r)]));
}

/** A study over sprinklings grown by more N values and seeds: its new request and the cells it lacks. */
export interface PlannedExtension {
  request: SprinkledStudyRequest;
  /** the new cells only, positions after the existing ones, smallest N first and seeds round-robin */
  cells: PlannedCell[];
}

/**
 * Grows a sprinkled study by the seed rule of planCells: every (N, seed) of the grown grid of counts ×
 * seeds that `existing` lacks becomes a cell, so no (N, seed) is planned twice and the cells already
 * there keep their positions and results. Checks the grown grid as planCells and checkRulesFit do (a
 * smaller N must still hold every subregion and serve every rule), and refuses an extension that adds
 * nothing. Throws StudyPlanError naming the field.
 */
export function planExtension(
  request: SprinkledStudyRequest,
  subregions: ResolvedSubregion[],
  existing: { position: number; count: number; seed: string }[],
  added: { counts: number[]; seeds: string[] },
): PlannedExtension {
  const repeatedCount = added.counts.findIndex((c) => request.counts.includes(c));
  if (repeatedCount >= 0) throw new StudyPlanError(`the study already has N = ${added.counts[repeatedCount]}`, `counts.${repeatedCount}`);
  const repeatedSeed = added.seeds.findIndex((s) => request.seeds.includes(s));
  if (repeatedSeed >= 0) throw new StudyPlanError(`the study already has the seed "${added.seeds[repeatedSeed]}"`, `seeds.${repeatedSeed}`);
  const grown: SprinkledStudyRequest = { ...request, counts: [...request.counts, ...added.counts], seeds: [...request.seeds, ...added.seeds] };
  const planned = planCells(grown, subregions);
  const smallest = Math.min(...grown.counts);
  checkRulesFit(grown.rules, grown.process === 'poisson' ? Math.ceil(smallest + 5 * Math.sqrt(smallest)) : smallest, grown.process !== 'poisson');
  const have = new Set(existing.map((c) => `${c.count}\u0000${c.seed}`));
  const after = Math.max(-1, ...existing.map((c) => c.position)) + 1;
  const cells = planned.filter((c) => !have.has(`${c.count}\u0000${c.seed}`)).map((c, k) => ({ ...c, position: after + k }));
  if (cells.length === 0) throw new StudyPlanError('the extension adds no sprinkling the study does not have', 'counts');
  return { request: grown, cells };
}
