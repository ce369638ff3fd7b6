import type { RegionSpec } from '../../shared/vacuum';

/**
 * Spacetime regions with exact volume, exact membership and their causal relation
 * (server/engine/README.md §1–§2; units c = 1). Points are flat arrays of `dimension` coordinates (t, x[, y, z]).
 */
export interface Region {
  readonly spec: RegionSpec;
  readonly dimension: 2 | 4;
  readonly volume: number;
  /** true iff the event lies in the region (open interior; the boundary has measure zero) */
  contains(event: ArrayLike<number>): boolean;
  /** axis-aligned box [min, max] per coordinate that contains the region, for rejection sampling */
  readonly boundingBox: { min: number[]; max: number[] };
  /** distance along x used by the causal relation: |Δx| in the plane, the shortest way round on the cylinder */
  readonly periodX?: number;
}

/** Spatial separation along x, respecting a periodic identification x ~ x + period. */
export function separationX(dx: number, period?: number): number {
  const a = Math.abs(dx);
  if (period === undefined) return a;
  const r = a % period;
  return Math.min(r, period - r);
}

/**
 * i ≺ j for two events given as flat coordinates: strict causal future (server/engine/README.md §1); on the
 * cylinder the relation is that of the universal cover, i.e. j is in the future of some image of i.
 */
export function precedes(points: ArrayLike<number>, dimension: 2 | 4, i: number, j: number, periodX?: number): boolean {
  const a = i * dimension;
  const b = j * dimension;
  const dt = points[b] - points[a];
  if (dt <= 0) return false;
  if (dimension === 2) return dt > separationX(points[b + 1] - points[a + 1], periodX);
  const dx = points[b + 1] - points[a + 1];
  const dy = points[b + 2] - points[a + 2];
  const dz = points[b + 3] - points[a + 3];
  return dt * dt > dx * dx + dy * dy + dz * dz;
}

const SQRT1_2 = Math.SQRT1_2;

/**
 * 2D causal diamond between tips p ≺ q: a square in light-cone coordinates u = (t+x)/√2, v = (t−x)/√2,
 * volume Δu Δv = τ²/2 (server/engine/README.md §2).
 */
function diamond2d(spec: Extract<RegionSpec, { kind: 'diamond2d' }>): Region {
  const half = spec.properTime !== undefined ? spec.properTime / 2 : 0;
  const past = spec.past ?? { t: -half, x: 0 };
  const future = spec.future ?? { t: half, x: 0 };
  const u0 = (past.t + past.x) * SQRT1_2;
  const v0 = (past.t - past.x) * SQRT1_2;
  const u1 = (future.t + future.x) * SQRT1_2;
  const v1 = (future.t - future.x) * SQRT1_2;
  if (!(u1 > u0 && v1 > v0)) throw new RangeError('diamond tips must be timelike separated, future after past');
  return {
    spec,
    dimension: 2,
    volume: (u1 - u0) * (v1 - v0),
    contains(e) {
      const u = (e[0] + e[1]) * SQRT1_2;
      const v = (e[0] - e[1]) * SQRT1_2;
      return u > u0 && u < u1 && v > v0 && v < v1;
    },
    boundingBox: {
      min: [past.t, Math.min((u0 - v1) * SQRT1_2, (u0 - v0) * SQRT1_2)],
      max: [future.t, Math.max((u1 - v0) * SQRT1_2, (u1 - v1) * SQRT1_2)],
    },
  };
}

/**
 * Causal diamond on the cylinder x ~ x + L between (−T/2, 0) and (T/2, 0): at height s above the past
 * tip its cross-section has length min(2s, 2(T−s), L), so the volume is T²/2 when T ≤ L and
 * T²/2 − (T−L)²/2 when the two light cones wrap around (T > L). Coordinates x lie in [−L/2, L/2).
 * For T > L some pairs are related through two or more images; the order stays 0/1, but the Green
 * function counts the images (green.ts `masslessGreenRelation`, order.ts `imageCount`).
 */
function cylinderDiamond(spec: Extract<RegionSpec, { kind: 'cylinder2d' }>): Region {
  const T = spec.properTime;
  const L = spec.circumference;
  const volume = T <= L ? (T * T) / 2 : (T * T) / 2 - ((T - L) * (T - L)) / 2;
  const halfWidth = Math.min(T / 2, L / 2);
  return {
    spec,
    dimension: 2,
    volume,
    periodX: L,
    contains(e) {
      const t = e[0];
      if (e[1] < -L / 2 || e[1] >= L / 2) return false;
      const d = separationX(e[1], L);
      return t + T / 2 > d && T / 2 - t > d;
    },
    boundingBox: { min: [-T / 2, -halfWidth], max: [T / 2, halfWidth] },
  };
}

function slab2d(spec: Extract<RegionSpec, { kind: 'slab2d' }>): Region {
  return {
    spec,
    dimension: 2,
    volume: (spec.tMax - spec.tMin) * (spec.xMax - spec.xMin),
    contains: (e) => e[0] > spec.tMin && e[0] < spec.tMax && e[1] > spec.xMin && e[1] < spec.xMax,
    boundingBox: { min: [spec.tMin, spec.xMin], max: [spec.tMax, spec.xMax] },
  };
}

/** 4D causal diamond with tips (±τ/2, 0⃗): volume πτ⁴/24 (server/engine/README.md §2). */
function diamond4d(spec: Extract<RegionSpec, { kind: 'diamond4d' }>): Region {
  const h = spec.properTime / 2;
  return {
    spec,
    dimension: 4,
    volume: (Math.PI * spec.properTime ** 4) / 24,
    contains(e) {
      const r = Math.sqrt(e[1] * e[1] + e[2] * e[2] + e[3] * e[3]);
      return r < h - Math.abs(e[0]);
    },
    boundingBox: { min: [-h, -h, -h, -h], max: [h, h, h, h] },
  };
}

export function makeRegion(spec: RegionSpec): Region {
  switch (spec.kind) {
    case 'diamond2d':
      return diamond2d(spec);
    case 'cylinder2d':
      return cylinderDiamond(spec);
    case 'slab2d':
      return slab2d(spec);
    case 'diamond4d':
      return diamond4d(spec);
  }
}
