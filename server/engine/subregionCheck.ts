import type { Event, RegionSpec, SubregionPair, SubregionSpec } from '@shared/vacuum';
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
  // the part of a de Sitter region inside an observer's horizons: tips on the conformal boundary (server/engine/README.md §17)
  if (geometry.isHorizonDiamond?.(past, future, slack)) return null;
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

/** What makes a pair A, B impossible, with the part at fault as a path below the pair ('a', 'b.past', 'a.indices', …). */
export interface SubregionPairIssue {
  field: string;
  message: string;
}

/** p ≺ q for two flat events (strict causal future; on the cylinder through the nearest image). */
function tipPrecedes(p: ArrayLike<number>, q: ArrayLike<number>, periodX?: number): boolean {
  const dt = q[0] - p[0];
  if (!(dt > 0)) return false;
  return dt > (p.length === 4 ? Math.hypot(q[1] - p[1], q[2] - p[2], q[3] - p[3]) : separationX(q[1] - p[1], periodX));
}

/**
 * Whether two 2D sub-diamonds share interior points: in light-cone coordinates each is an open
 * rectangle, and two open rectangles meet exactly when p_A ≺ q_B and p_B ≺ q_A (§1). On the cylinder B
 * stands for all its images x + kL, and the same image must satisfy both.
 */
function diamonds2dOverlap(pa: number[], qa: number[], pb: number[], qb: number[], periodX?: number): boolean {
  if (periodX === undefined) return tipPrecedes(pa, qb) && tipPrecedes(pb, qa);
  const reach = Math.ceil(Math.max(qa[0] - pa[0], qb[0] - pb[0]) / periodX) + Math.ceil(Math.abs(pa[1] - pb[1]) / periodX) + 1;
  for (let k = -reach; k <= reach; k++) {
    const shift = (e: number[]) => [e[0], e[1] + k * periodX];
    if (tipPrecedes(pa, shift(qb)) && tipPrecedes(shift(pb), qa)) return true;
  }
  return false;
}

/**
 * Whether two subregions can give a mutual information I(A:B) (server/engine/README.md §15) before any
 * point is known (null when they can): both of one kind; sub-diamonds placed like the subregion
 * (diamondPlacementIssue) and disjoint and spacelike to each other, decided from the tips — a point of
 * A precedes one of B exactly when p_A ≺ q_B, so A and B are spacelike iff neither p_A ≺ q_B nor
 * p_B ≺ q_A; in 2D both together mean they overlap, one alone that they are causally related (x taken
 * round the cylinder); in 4D the tips cannot tell overlap from relation, so either is refused as
 * "overlap or are causally related". Element lists must share no element and hold at least 2 distinct
 * labels each, below `elementCount` when it is given (exact false: only a plausible maximum, as for a
 * Poisson sprinkling). `hasCoordinates` false (a relation list) refuses sub-diamonds. Used by
 * validateVacuumRequest and by the API's study planner, so both refuse the same pairs.
 */
export function subregionPairIssue(
  pair: SubregionPair,
  dimension: 2 | 4,
  region: RegionSpec | null,
  options: { elementCount?: { n: number; exact: boolean }; hasCoordinates?: boolean } = {},
): SubregionPairIssue | null {
  const sides = [['a', pair.a], ['b', pair.b]] as const;
  if (pair.a.kind !== pair.b.kind) return { field: 'b', message: 'A and B must both be sub-diamonds or both element lists' };
  if (pair.a.kind === 'elements' && pair.b.kind === 'elements') {
    for (const [side, spec] of sides) {
      const indices = (spec as Extract<SubregionSpec, { kind: 'elements' }>).indices;
      const issue = options.elementCount
        ? elementListIssue(indices, options.elementCount.n, options.elementCount.exact)
        : new Set(indices).size < 2
          ? { field: 'indices' as const, message: `the subregion lists ${new Set(indices).size} distinct element(s); the entropy needs at least 2` }
          : null;
      if (issue) return { field: `${side}.indices`, message: issue.message.replace(/^the subregion/, `subregion ${side.toUpperCase()}`) };
    }
    const inA = new Set(pair.a.indices);
    const shared = pair.b.indices.filter((i) => inA.has(i));
    if (shared.length > 0) {
      return { field: 'b.indices', message: `A and B share ${new Set(shared).size} element(s) (element ${shared[0]} is one); the mutual information needs disjoint subregions` };
    }
    return null;
  }
  if (pair.a.kind !== 'diamond' || pair.b.kind !== 'diamond') return null;
  const tips: Record<'a' | 'b', { past: number[]; future: number[] }> = {
    a: { past: tipCoordinates(pair.a.past), future: tipCoordinates(pair.a.future) },
    b: { past: tipCoordinates(pair.b.past), future: tipCoordinates(pair.b.future) },
  };
  for (const [side] of sides) {
    const name = `sub-diamond ${side.toUpperCase()}`;
    if (options.hasCoordinates === false) {
      return { field: side, message: `a causal set given by its relation has no coordinates: give ${name.replace('sub-diamond', 'subregion')} as a list of elements` };
    }
    const { past, future } = tips[side];
    if (past.length !== dimension || future.length !== dimension) return { field: side, message: `the tips of ${name} must have ${dimension} coordinates like the points` };
    const issue = diamondPlacementIssue(past, future, region);
    if (issue) return { field: issue.field ? `${side}.${issue.field}` : side, message: `${name}: ${issue.message}` };
  }
  const periodX = region ? makeRegion(region).periodX : undefined;
  const aBeforeB = tipPrecedes(tips.a.past, tips.b.future, periodX);
  const bBeforeA = tipPrecedes(tips.b.past, tips.a.future, periodX);
  if (!aBeforeB && !bBeforeA) return null;
  if (dimension === 4) {
    return { field: 'b', message: 'sub-diamonds A and B overlap or are causally related (a tip of one precedes the opposite tip of the other); the mutual information needs disjoint, spacelike-separated subregions' };
  }
  if (diamonds2dOverlap(tips.a.past, tips.a.future, tips.b.past, tips.b.future, periodX)) {
    return { field: 'b', message: 'sub-diamonds A and B overlap; the mutual information needs disjoint, spacelike-separated subregions' };
  }
  return {
    field: 'b',
    message: `sub-diamonds A and B are causally related (part of ${aBeforeB ? 'A lies in the past of B' : 'B lies in the past of A'}); the mutual information needs spacelike-separated subregions`,
  };
}
