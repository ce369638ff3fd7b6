import type { Event, RegionSpec } from '../../shared/vacuum';
import { makeRegion, separationX } from './regions';

/** An event as flat coordinates t, x[, y, z]. */
export const tipCoordinates = (e: Event): number[] => ('y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x]);

/**
 * What makes a subregion impossible before any work, with the part of it at fault: `past`, `future` or
 * `indices` (a path below the subregion, as in API issues), or '' for the subregion as a whole.
 */
export interface SubregionIssue {
  field: '' | 'past' | 'future' | 'indices';
  message: string;
}

const show = (v: number) => String(Number(v.toPrecision(6)));
const eventText = (e: ArrayLike<number>) =>
  e.length === 4 ? `(t = ${show(e[0])}, x = ${show(e[1])}, y = ${show(e[2])}, z = ${show(e[3])})` : `(t = ${show(e[0])}, x = ${show(e[1])})`;

/**
 * How far an event lies inside the region: ≥ 0 on the closed region, < 0 outside, in coordinate units
 * (for the diamonds, along a light-cone coordinate). On the cylinder x counts modulo the circumference,
 * so x = L/2 + a is the event at −L/2 + a.
 */
function insideMargin(spec: RegionSpec, e: ArrayLike<number>): number {
  switch (spec.kind) {
    case 'diamond2d': {
      const half = spec.properTime !== undefined ? spec.properTime / 2 : 0;
      const p = spec.past ?? { t: -half, x: 0 };
      const q = spec.future ?? { t: half, x: 0 };
      const u = e[0] + e[1];
      const v = e[0] - e[1];
      return Math.min(u - (p.t + p.x), q.t + q.x - u, v - (p.t - p.x), q.t - q.x - v);
    }
    case 'cylinder2d': {
      const d = separationX(e[1], spec.circumference);
      return Math.min(e[0] + spec.properTime / 2 - d, spec.properTime / 2 - e[0] - d);
    }
    case 'slab2d':
      return Math.min(e[0] - spec.tMin, spec.tMax - e[0], e[1] - spec.xMin, spec.xMax - e[1]);
    case 'diamond4d':
      return spec.properTime / 2 - Math.abs(e[0]) - Math.hypot(e[1], e[2], e[3]);
  }
}

/** Rounding allowance for "on the boundary": a tip given as the region's own tip must count as inside. */
function boundarySlack(spec: RegionSpec): number {
  const { min, max } = makeRegion(spec).boundingBox;
  return 1e-9 * Math.max(...max.map((m, k) => m - min[k]), ...max.map(Math.abs), ...min.map(Math.abs));
}

/**
 * Whether a sub-diamond between the tips `past` and `future` (flat t, x[, y, z]) can be computed in the
 * region (null when it can). The rule:
 * 1. the future tip lies strictly inside the future light cone of the past tip (Δt > |Δx|; on the
 *    cylinder Δx is the shorter way round, i.e. the future tip is in the future of some image of the
 *    past tip, the causal order the entropy uses);
 * 2. both tips lie in the closure of the region (a tip on the boundary is allowed, so the region's own
 *    tips give the whole region);
 * 3. the whole sub-diamond lies in the closed region. For the diamond regions (2D, 4D, cylinder) this
 *    follows from 2: a causal diamond is causally convex (p ≼ e ≼ q with p, q in it puts e in it). A slab
 *    is not convex along x, so there a sub-diamond with its tips inside can still reach out at its
 *    spatial corners; such a sub-diamond is refused: the elements it would hold fill a diamond clipped by
 *    the slab, whose entropy is not that of the diamond asked for (and whose size is not the volume of
 *    the diamond a study plans with).
 * Without a region (points given with a density only) only rule 1 applies. `regionName` names the
 * region in messages ("the diamond2d region" unless given).
 */
export function diamondPlacementIssue(
  past: ArrayLike<number>,
  future: ArrayLike<number>,
  region: RegionSpec | null,
  regionName = region ? `the ${region.kind} region` : 'the region',
): SubregionIssue | null {
  const periodX = region?.kind === 'cylinder2d' ? region.circumference : undefined;
  const dt = future[0] - past[0];
  const spatial =
    past.length === 4 ? Math.hypot(future[1] - past[1], future[2] - past[2], future[3] - past[3]) : separationX(future[1] - past[1], periodX);
  if (!(dt > spatial)) {
    return {
      field: 'future',
      message: `the future tip ${eventText(future)} must lie strictly inside the future light cone of the past tip ${eventText(past)}${periodX !== undefined ? ` (x periodic with circumference ${show(periodX)})` : ''}`,
    };
  }
  if (!region) return null;
  const slack = boundarySlack(region);
  for (const [field, tip] of [['past', past], ['future', future]] as const) {
    if (insideMargin(region, tip) < -slack) {
      return { field, message: `the ${field} tip ${eventText(tip)} lies outside ${regionName}: both tips must lie in the region or on its boundary` };
    }
  }
  if (region.kind === 'slab2d') {
    // the diamond's spatial corners, from the light-cone coordinates u = t + x, v = t − x of its tips
    const corners = [
      [past[0] + past[1], future[0] - future[1]],
      [future[0] + future[1], past[0] - past[1]],
    ].map(([u, v]) => [(u + v) / 2, (u - v) / 2]);
    const out = corners.find((c) => insideMargin(region, c) < -slack);
    if (out) {
      return {
        field: '',
        message: `the sub-diamond reaches outside the slab at its corner ${eventText(out)}: a sub-diamond must lie wholly in the slab (a clipped diamond is not the diamond asked for)`,
      };
    }
  }
  return null;
}

/**
 * Whether an element list can be computed on a causal set of `size` elements (null when it can).
 * `exact` false: `size` is only the largest plausible N (a Poisson sprinkling, whose N is drawn in the
 * worker), so only labels at or past it are refused here.
 */
export function elementListIssue(indices: readonly number[], size: number, exact: boolean): SubregionIssue | null {
  const distinct = new Set(indices);
  if (distinct.size < 2) return { field: 'indices', message: `the subregion lists ${distinct.size} distinct element(s); the entropy needs at least 2` };
  let beyond = -1;
  for (const i of distinct) if (i > beyond) beyond = i;
  if (beyond < size) return null;
  return {
    field: 'indices',
    message: exact
      ? `subregion element ${beyond} does not exist: the causal set has ${size} elements, labelled 0 to ${size - 1}`
      : `subregion element ${beyond} cannot exist: this Poisson sprinkling has at most about ${size} elements (its mean plus five standard deviations)`,
  };
}
