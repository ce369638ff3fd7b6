import type { RegionMeasure, UniformSource } from './common';

/**
 * Regions of a 2D spacetime that is conformally flat with a factor depending on the time alone,
 * ds² = Ω²(t)(−dt² + dx²) — 2D de Sitter in global and in Poincaré coordinates (server/engine/README.md §17).
 * Every region used here has an interval [lo(t), hi(t)] as its cross-section at time t, with lo and hi
 * linear between known break times (diamonds are rectangles in u = t + x, v = t − x; slabs cut them
 * at two times), so its measure ∫ (hi − lo) Ω² dt is exact piece by piece from two integrals of Ω².
 */
export interface ConformalFactor {
  /** Ω²(t) = √−g, the volume element in the conformal coordinates */
  density(t: number): number;
  /** ∫_a^b Ω²(t) dt */
  mass(a: number, b: number): number;
  /** ∫_a^b (t − a) Ω²(t) dt */
  moment(a: number, b: number): number;
}

/**
 * Global de Sitter of radius 1: Ω² = sec²T. ∫ sec² = tan, written as sin(b − a)/(cos a cos b) so a short
 * interval keeps its relative precision; ∫ (T − a) sec²T dT = (b − a) tan b + ln(cos b / cos a), the
 * logarithm as log1p(cos h − 1 − tan a sin h) with h = b − a.
 */
export const globalDeSitterFactor: ConformalFactor = {
  density: (t) => 1 / (Math.cos(t) * Math.cos(t)),
  mass: (a, b) => Math.sin(b - a) / (Math.cos(a) * Math.cos(b)),
  moment(a, b) {
    const h = b - a;
    const s = Math.sin(h / 2);
    return h * Math.tan(b) + Math.log1p(-2 * s * s - Math.tan(a) * Math.sin(h));
  },
};

/**
 * The Poincaré patch of radius 1: Ω² = 1/η², η < 0. ∫ η⁻² = (b − a)/(ab); ∫ (η − a) η⁻² dη =
 * ln(b/a) + a/b − 1 = z − log1p(z) with z = (a − b)/b ≥ 0.
 */
export const poincareFactor: ConformalFactor = {
  density: (t) => 1 / (t * t),
  mass: (a, b) => (b - a) / (a * b),
  moment(a, b) {
    const z = (a - b) / b;
    return z - Math.log1p(z);
  },
};

/** A region by its cross-sections: x ∈ (lo(t), hi(t)) for t ∈ (start, end), lo and hi linear between breaks. */
export interface ConformalProfile {
  readonly factor: ConformalFactor;
  readonly start: number;
  readonly end: number;
  /** every time in (start, end) where lo or hi changes slope */
  readonly breaks: readonly number[];
  section(t: number): [number, number];
}

/** Light-cone bounds u = t + x ∈ (u0, u1), v = t − x ∈ (v0, v1) of a diamond. */
export interface LightConeBox {
  u0: number;
  u1: number;
  v0: number;
  v1: number;
}

/** The light-cone box of the diamond between two tips (t, x). */
export const lightConeBox = (past: ArrayLike<number>, future: ArrayLike<number>): LightConeBox => ({
  u0: past[0] + past[1],
  u1: future[0] + future[1],
  v0: past[0] - past[1],
  v1: future[0] - future[1],
});

/** The overlap of two light-cone boxes (a diamond again, possibly empty). */
export const intersectBoxes = (a: LightConeBox, b: LightConeBox): LightConeBox => ({
  u0: Math.max(a.u0, b.u0),
  u1: Math.min(a.u1, b.u1),
  v0: Math.max(a.v0, b.v0),
  v1: Math.min(a.v1, b.v1),
});

/**
 * The diamond of a light-cone box cut to the times (from, to): the cross-section at t is
 * x ∈ (max(u0 − t, t − v1), min(u1 − t, t − v0)), its ends change slope at the side corners
 * t = (u0 + v1)/2 and (u1 + v0)/2, and it closes at the tips t = (u0 + v0)/2 and (u1 + v1)/2.
 */
export function diamondProfile(factor: ConformalFactor, box: LightConeBox, from = -Infinity, to = Infinity): ConformalProfile {
  const empty = !(box.u1 > box.u0 && box.v1 > box.v0);
  const start = Math.max(from, (box.u0 + box.v0) / 2);
  const end = empty ? start : Math.min(to, (box.u1 + box.v1) / 2);
  const breaks = [(box.u0 + box.v1) / 2, (box.u1 + box.v0) / 2].filter((t) => t > start && t < end);
  return {
    factor,
    start,
    end,
    breaks,
    section: (t) => [Math.max(box.u0 - t, t - box.v1), Math.min(box.u1 - t, t - box.v0)],
  };
}

/** The slab t ∈ (start, end), x ∈ (lo, hi). */
export function slabProfile(factor: ConformalFactor, start: number, end: number, lo: number, hi: number): ConformalProfile {
  return { factor, start, end, breaks: [], section: () => [lo, hi] };
}

interface Piece {
  a: number;
  b: number;
  /** width at a, and its slope in t */
  width: number;
  slope: number;
  /** measure of the piece, and of the pieces before it */
  mass: number;
  before: number;
}

const widthAt = (profile: ConformalProfile, t: number) => {
  const [lo, hi] = profile.section(t);
  return Math.max(0, hi - lo);
};

function pieces(profile: ConformalProfile): Piece[] {
  if (!(profile.end > profile.start)) return [];
  const times = [profile.start, ...[...profile.breaks].sort((p, q) => p - q), profile.end];
  const out: Piece[] = [];
  let before = 0;
  for (let k = 0; k + 1 < times.length; k++) {
    const a = times[k]!;
    const b = times[k + 1]!;
    if (!(b > a)) continue;
    const width = widthAt(profile, a);
    const slope = (widthAt(profile, b) - width) / (b - a);
    const mass = Math.max(0, width * profile.factor.mass(a, b) + slope * profile.factor.moment(a, b));
    out.push({ a, b, width, slope, mass, before });
    before += mass;
  }
  return out;
}

/** ∫∫ Ω²(t) dt dx over the profile, exact (up to rounding) piece by piece. */
export function profileMeasure(profile: ConformalProfile): number {
  return pieces(profile).reduce((sum, p) => sum + p.mass, 0);
}

/** The measure of a piece from its start a to t. */
const partialMass = (factor: ConformalFactor, p: Piece, t: number) => p.width * factor.mass(p.a, t) + p.slope * factor.moment(p.a, t);

/**
 * The time at which the measure of the piece from its start reaches `target`: safeguarded Newton on
 * the increasing partial measure (its derivative is width(t) Ω²(t)), bisecting whenever a step would
 * leave the bracket (Press et al., Numerical Recipes §9.4 "rtsafe", recalled from memory).
 */
function timeAtMass(factor: ConformalFactor, p: Piece, target: number): number {
  let lo = p.a;
  let hi = p.b;
  let t = p.a + (p.b - p.a) * (target / p.mass);
  for (let iteration = 0; iteration < 200; iteration++) {
    const f = partialMass(factor, p, t) - target;
    if (f === 0) return t;
    if (f < 0) lo = t;
    else hi = t;
    if (!(hi - lo > 4 * Number.EPSILON * Math.max(Math.abs(lo), Math.abs(hi)))) break;
    const slope = (p.width + p.slope * (t - p.a)) * factor.density(t);
    const next = slope > 0 ? t - f / slope : Number.NaN;
    t = next > lo && next < hi ? next : (lo + hi) / 2;
  }
  return t;
}

/**
 * A sampler of points distributed by the measure Ω² dt dx on the profile: t from its marginal
 * (hi − lo)Ω² by inverting the exact cumulative measure, then x uniform in the cross-section at t —
 * exact because Ω² does not depend on x. Two uniform draws per point, t first, so a sprinkling of N
 * points is the start of one of 2N with the same seed, as on flat regions (server/engine/README.md §3).
 */
export function profileSampler(profile: ConformalProfile): (uniform: UniformSource, into: Float64Array, offset: number) => void {
  const list = pieces(profile).filter((p) => p.mass > 0);
  const total = list.reduce((sum, p) => sum + p.mass, 0);
  if (!(total > 0)) throw new RangeError('the region has no volume to sprinkle into');
  return (uniform, into, offset) => {
    const target = uniform() * total;
    let k = 0;
    while (k + 1 < list.length && list[k + 1]!.before <= target) k++;
    const piece = list[k]!;
    const t = timeAtMass(profile.factor, piece, Math.min(piece.mass, Math.max(0, target - piece.before)));
    const [lo, hi] = profile.section(t);
    into[offset] = t;
    into[offset + 1] = lo + (hi - lo) * uniform();
  };
}

/** The measure Ω²(t) dt dx of a profile as a region's measure: √−g and its exact sampler. */
export function conformalMeasure(profile: ConformalProfile, volumeElement: string): RegionMeasure {
  const draw = profileSampler(profile);
  return { volumeElement, density: (e) => profile.factor.density(e[0]), draw };
}

/**
 * The volume of the part of the diamond between two tips that lies in a region given by its own
 * light-cone box and conformal times (from, to): both diamonds are rectangles in (u, v), so their
 * overlap is one, cut by the slab.
 */
export function clippedDiamondVolume(
  factor: ConformalFactor,
  past: ArrayLike<number>,
  future: ArrayLike<number>,
  region: { box?: LightConeBox; from: number; to: number },
): number {
  const own = lightConeBox(past, future);
  return profileMeasure(diamondProfile(factor, region.box ? intersectBoxes(own, region.box) : own, region.from, region.to));
}

/** Whether two tips are those of a static patch of global de Sitter, (∓π/2, θ₀), within `slack` (x compared by `separation`). */
export function areStaticPatchTips(past: ArrayLike<number>, future: ArrayLike<number>, slack: number, separation: (dx: number) => number): boolean {
  const half = Math.PI / 2;
  return Math.abs(past[0] + half) <= slack && Math.abs(future[0] - half) <= slack && separation(future[1] - past[1]) <= slack;
}
