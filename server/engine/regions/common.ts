import type { RegionKind, RegionSpec, RegionSpecOf } from '@shared/regions';

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
  /**
   * How far an event lies inside the region: ≥ 0 on the closed region, < 0 outside, in coordinate units
   * (for the diamonds, along a light-cone coordinate). Decides whether a sub-diamond's tip may be used.
   */
  insideMargin(event: ArrayLike<number>): number;
  /** axis-aligned box [min, max] per coordinate that contains the region, for rejection sampling */
  readonly boundingBox: { min: number[]; max: number[] };
  /**
   * The period L of x ~ x + L, for a region with a periodic x. The causal order then goes through the
   * images of each point (`separationX`, `precedes`) and the retarded Green function counts them
   * (method of images: green.ts `masslessGreenRelation` with `imageCount`).
   */
  readonly periodX?: number;
  /**
   * For a region that is not causally convex: why the sub-diamond between two tips in the closed region
   * still leaves it (null when it does not). Absent when causal convexity makes the tips enough
   * (p ≼ e ≼ q with p, q in the region puts e in it). `slack` is the rounding allowance on the boundary.
   */
  subDiamondIssue?(past: ArrayLike<number>, future: ArrayLike<number>, slack: number): string | null;
  /**
   * A volume element other than dt dx: a curved region stored in conformal coordinates
   * (server/engine/README.md §17). `volume` is then ∫√−g, and sprinkling draws from this measure
   * instead of uniformly from the bounding box. Absent for the flat regions.
   */
  readonly measure?: RegionMeasure;
  /**
   * The volume (∫√−g) of the part of the causal diamond between two tips that lies in the region, for
   * regions whose measure is not flat (absent: the flat τ²/2 or πτ⁴/24 of a diamond inside the region).
   */
  subDiamondVolume?(past: ArrayLike<number>, future: ArrayLike<number>): number;
  /**
   * For a region with cosmological horizons: true when the tips are those of an observer's static
   * patch on the conformal boundary, (T, θ) = (∓π/2, θ₀) to within `slack`. Such a sub-diamond lies
   * partly outside the region; its elements are those inside the observer's horizons.
   */
  isHorizonDiamond?(past: ArrayLike<number>, future: ArrayLike<number>, slack: number): boolean;
}

/** A uniform source in [0, 1). */
export type UniformSource = () => number;

/** The volume element √−g of a region in its stored coordinates, and an exact sampler of it. */
export interface RegionMeasure {
  /** the formula, for notes and messages: "sec²T" */
  readonly volumeElement: string;
  /** √−g at an event */
  density(event: ArrayLike<number>): number;
  /** one point drawn from √−g normalised on the region, written at into[offset …] */
  draw(uniform: UniformSource, into: Float64Array, offset: number): void;
}

/** The geometry of one region kind: its region from a spec, and what is known about its continuum. */
export interface RegionGeometry<K extends RegionKind = RegionKind> {
  readonly kind: K;
  /** the region of a valid spec (RangeError for tips the schema would refuse) */
  make(spec: RegionSpecOf<K>): Region;
  /**
   * The continuum spectrum of iΔ for N elements in this region (its first `count` positive values,
   * descending), where one is known; the run page plots it beside the computed one.
   */
  continuumSpectrum?(n: number, count: number): Float64Array;
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

const show = (v: number) => String(Number(v.toPrecision(6)));

/** An event in messages: "(t = 0.5, x = 0)". */
export function eventText(e: ArrayLike<number>): string {
  return e.length === 4 ? `(t = ${show(e[0])}, x = ${show(e[1])}, y = ${show(e[2])}, z = ${show(e[3])})` : `(t = ${show(e[0])}, x = ${show(e[1])})`;
}

/** A number in messages, to six significant digits. */
export const numberText = show;
