import type { Event, RegionSpec } from '@shared/vacuum';
import { eventText, makeRegion, numberText as show, separationX, type Region } from './regions';

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

/** Rounding allowance for "on the boundary": a tip given as the region's own tip must count as inside. */
function boundarySlack(region: Region): number {
  const { min, max } = region.boundingBox;
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
 * 3. the whole sub-diamond lies in the closed region. For a causally convex region (the diamonds: 2D,
 *    4D, cylinder) this follows from 2 (p ≼ e ≼ q with p, q in it puts e in it); a region that is not
 *    (a slab, at a sub-diamond's spatial corners) says so through its `subDiamondIssue`.
 * Without a region (points given with a density only) only rule 1 applies. `regionName` names the
 * region in messages ("the diamond2d region" unless given).
 */
export function diamondPlacementIssue(
  past: ArrayLike<number>,
  future: ArrayLike<number>,
  region: RegionSpec | null,
  regionName = region ? `the ${region.kind} region` : 'the region',
): SubregionIssue | null {
  const geometry = region ? makeRegion(region) : null;
  const periodX = geometry?.periodX;
  const dt = future[0] - past[0];
  const spatial =
    past.length === 4 ? Math.hypot(future[1] - past[1], future[2] - past[2], future[3] - past[3]) : separationX(future[1] - past[1], periodX);
  if (!(dt > spatial)) {
    return {
      field: 'future',
      message: `the future tip ${eventText(future)} must lie strictly inside the future light cone of the past tip ${eventText(past)}${periodX !== undefined ? ` (x periodic with circumference ${show(periodX)})` : ''}`,
    };
  }
  if (!geometry) return null;
  const slack = boundarySlack(geometry);
  for (const [field, tip] of [['past', past], ['future', future]] as const) {
    if (geometry.insideMargin(tip) < -slack) {
      return { field, message: `the ${field} tip ${eventText(tip)} lies outside ${regionName}: both tips must lie in the region or on its boundary` };
    }
  }
  const outside = geometry.subDiamondIssue?.(past, future, slack);
  return outside ? { field: '', message: outside } : null;
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
