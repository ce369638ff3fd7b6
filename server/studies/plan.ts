import type { CreateStudyRequest, ResolvedSubregion } from '../../shared/studies';
import { STUDY_MIN_SUBREGION_ELEMENTS, studyRuleKey, studyRuleLabel } from '../../shared/studies';
import type { Event, RegionSpec, SprinklingSpecInput, SubregionSpec } from '../../shared/vacuum';
import { makeRegion } from '../engine/regions';

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

type Tips = { past: Event; future: Event };

/** Centre and axis of the region's own diamond, when it is one. */
function regionTips(region: RegionSpec): Tips | null {
  switch (region.kind) {
    case 'diamond2d': {
      if (region.properTime !== undefined) return { past: { t: -region.properTime / 2, x: 0 }, future: { t: region.properTime / 2, x: 0 } };
      return { past: region.past!, future: region.future! };
    }
    case 'cylinder2d':
      return { past: { t: -region.properTime / 2, x: 0 }, future: { t: region.properTime / 2, x: 0 } };
    case 'diamond4d':
      return { past: { t: -region.properTime / 2, x: 0, y: 0, z: 0 }, future: { t: region.properTime / 2, x: 0, y: 0, z: 0 } };
    case 'slab2d':
      return null;
  }
}

const coordinates = (e: Event): number[] => ('y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x]);
const toEvent = (c: number[]): Event => (c.length === 4 ? { t: c[0]!, x: c[1]!, y: c[2]!, z: c[3]! } : { t: c[0]!, x: c[1]! });

/** Tips scaled by f about the centre of the given tips: a concentric diamond with proper time f·τ. */
export function concentricTips(tips: Tips, fraction: number): Tips {
  const p = coordinates(tips.past);
  const q = coordinates(tips.future);
  const centre = p.map((v, k) => (v + q[k]!) / 2);
  const half = p.map((v, k) => (q[k]! - v) / 2);
  return { past: toEvent(centre.map((c, k) => c - fraction * half[k]!)), future: toEvent(centre.map((c, k) => c + fraction * half[k]!)) };
}

/** Spacetime volume of the causal diamond between two tips: τ²/2 in 2D, πτ⁴/24 in 4D (physics notes §1). */
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

/**
 * The study's subregions with stable keys: `l/L=0.5` for concentric ones (in the order given), `d1`,
 * `d2`, … for diamonds by tips. Throws StudyPlanError when they do not fit the region.
 */
export function resolveSubregions(request: Pick<CreateStudyRequest, 'region' | 'subregions'>): ResolvedSubregion[] {
  const region = makeRegion(request.region);
  const subregions = request.subregions;
  if (subregions.kind === 'concentric') {
    const tips = regionTips(request.region);
    if (!tips) throw new StudyPlanError('concentric sub-diamonds need a diamond region; give sub-diamonds by their tips for a slab', 'subregions.kind');
    return subregions.fractions.map((f) => ({ key: `l/L=${formatFraction(f)}`, label: `ℓ/L = ${formatFraction(f)}`, fraction: f, ...concentricTips(tips, f) }));
  }
  return subregions.diamonds.map((d, k) => {
    const path = `subregions.diamonds.${k}`;
    const dimension = 'y' in d.past ? 4 : 2;
    if (dimension !== region.dimension || ('y' in d.future ? 4 : 2) !== dimension) {
      throw new StudyPlanError(`the tips must have ${region.dimension === 2 ? 't, x' : 't, x, y, z'} coordinates like the region`, path);
    }
    if (diamondVolume(d) === 0) throw new StudyPlanError('the future tip must lie strictly inside the future light cone of the past tip', path);
    // tips nudged inwards along the axis, so a tip on the region's boundary still counts as inside
    const inner = concentricTips(d, 1 - 1e-9);
    if (!region.contains(coordinates(inner.past)) || !region.contains(coordinates(inner.future))) {
      throw new StudyPlanError('both tips must lie in the region', path);
    }
    return { key: `d${k + 1}`, label: d.label ?? `sub-diamond ${k + 1}`, fraction: null, past: d.past, future: d.future };
  });
}

/** The subregion as the engine takes it. */
export function engineSubregion(subregion: ResolvedSubregion): SubregionSpec {
  return { kind: 'diamond', past: subregion.past, future: subregion.future };
}

/** Expected elements of a subregion at N elements in the region: N × (volume ratio). */
export function expectedSubregionElements(request: Pick<CreateStudyRequest, 'region'>, subregion: ResolvedSubregion, count: number): number {
  return (count * diamondVolume(subregion)) / makeRegion(request.region).volume;
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
export function planCells(request: CreateStudyRequest, subregions: ResolvedSubregion[]): PlannedCell[] {
  const counts = [...request.counts].sort((a, b) => a - b);
  const smallest = counts[0]!;
  subregions.forEach((s, k) => {
    const expected = expectedSubregionElements(request, s, smallest);
    if (expected < STUDY_MIN_SUBREGION_ELEMENTS) {
      const path = request.subregions.kind === 'concentric' ? `subregions.fractions.${k}` : `subregions.diamonds.${k}`;
      throw new StudyPlanError(
        `${s.label} holds about ${expected.toFixed(1)} elements at N = ${smallest}; at least ${STUDY_MIN_SUBREGION_ELEMENTS} are needed for an entropy`,
        path,
      );
    }
  });
  const cells: PlannedCell[] = [];
  for (const count of counts) for (const seed of request.seeds) cells.push({ position: cells.length, count, seed });
  return cells;
}

/** The sprinkling of one cell. */
export function cellSprinkling(request: Pick<CreateStudyRequest, 'region' | 'process' | 'prng'>, count: number, seed: string): SprinklingSpecInput {
  return { region: request.region, process: request.process, count, seed, prng: request.prng };
}

export function ruleLabels(request: Pick<CreateStudyRequest, 'rules'>): Record<string, string> {
  return Object.fromEntries(request.rules.map((r) => [studyRuleKey(r), studyRuleLabel(r)]));
}
