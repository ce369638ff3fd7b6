import type { RestrictedCut, TruncationRule } from '@shared/vacuum';

export interface KneeFit {
  /** the continuum-like law of the kept modes, λ_k ≈ amplitude · k^(−exponent) */
  amplitude: number;
  exponent: number;
  /** β of the departure term −β (k/fitWindow)² fitted beside the law (in ln λ); not part of the law */
  curvature: number;
  /** the law was fitted over k = 2..fitWindow */
  fitWindow: number;
  tolerance: number;
  /**
   * how far the knee moves with its tolerance: modes kept at half (`low`) and at 1.5 times (`high`)
   * the tolerance, which normally bracket modesKept
   */
  rankRange: { low: number; high: number; lowTolerance: number; highTolerance: number };
}

export interface TruncationResult {
  rule: TruncationRule;
  /** λ_c: modes with λ > λ_c are kept */
  cutoff: number;
  /** positive eigenvalues of iΔ above the cut */
  modesKept: number;
  knee?: KneeFit;
}

/** Sorkin–Yazdi 2018 (CQG 35 074004; recalled from memory): the 2D cut √N/(4π). */
export function sqrtNCutoff(size: number): number {
  return Math.sqrt(size) / (4 * Math.PI);
}

/** The second cut of double truncation on a subregion of `elements` elements: √n/(4π) or a fixed λ. */
export function restrictedCutoff(elements: number, cut: RestrictedCut): number {
  return cut.rule === 'sqrtN' ? sqrtNCutoff(elements) : cut.cut;
}

function countAbove(descending: Float64Array, cut: number): number {
  let k = 0;
  while (k < descending.length && descending[k] > cut) k++;
  return k;
}

/** λ_c halfway between the last kept and the first dropped eigenvalue, so `λ > λ_c` keeps exactly `kept`. */
function cutBetween(descending: Float64Array, kept: number): number {
  if (kept >= descending.length) return 0;
  if (kept === 0) return descending[0];
  return (descending[kept - 1] + descending[kept]) / 2;
}

const DEFAULT_KNEE_TOLERANCE = 0.05;
/** consecutive departures needed before the knee is declared: a single noisy eigenvalue is not a knee */
const KNEE_RUN = 5;
/** refits of the self-consistent window; on sprinkled 2D and 4D spectra it settles within a handful */
const KNEE_MAX_REFITS = 30;
/** fewest modes in the window for the three-parameter fit; below it (tiny sets) the pure power law is fitted */
const KNEE_MIN_CURVATURE_POINTS = 12;

/** ln λ_k ≈ intercept + slope · ln k − curvature · (k/window)²; the law itself is intercept + slope · ln k */
interface LawFit {
  intercept: number;
  slope: number;
  curvature: number;
  window: number;
}

/** Solves the small symmetric system A x = b (n ≤ 3) by Gaussian elimination with partial pivoting. */
function solveSmall(a: number[][], b: number[]): number[] {
  const n = b.length;
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let row = col + 1; row < n; row++) if (Math.abs(a[row][col]) > Math.abs(a[pivot][col])) pivot = row;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    [b[col], b[pivot]] = [b[pivot], b[col]];
    for (let row = col + 1; row < n; row++) {
      const f = a[row][col] / a[col][col];
      for (let c = col; c < n; c++) a[row][c] -= f * a[col][c];
      b[row] -= f * b[col];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let row = n - 1; row >= 0; row--) {
    let s = b[row];
    for (let c = row + 1; c < n; c++) s -= a[row][c] * x[c];
    x[row] = s / a[row][row];
  }
  return x;
}

/** Weighted least squares (weight k) of ln λ_k over k = 2..window, with or without the curvature term. */
function fitLaw(descending: Float64Array, window: number, withCurvature: boolean): LawFit {
  const n = withCurvature ? 3 : 2;
  const a = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const b = new Array<number>(n).fill(0);
  const basis = new Array<number>(n);
  for (let k = 2; k <= window; k++) {
    basis[0] = 1;
    basis[1] = Math.log(k);
    if (withCurvature) basis[2] = -((k / window) ** 2);
    const y = Math.log(descending[k - 1]);
    for (let i = 0; i < n; i++) {
      b[i] += k * basis[i] * y;
      for (let j = 0; j < n; j++) a[i][j] += k * basis[i] * basis[j];
    }
  }
  const [intercept, slope, curvature = 0] = solveSmall(a, b);
  return { intercept, slope, curvature, window };
}

/**
 * Modes above the first of KNEE_RUN consecutive ranks k ≥ from with |λ_k / (a k^(−p)) − 1| > tolerance;
 * never more than the `usable` positive ones (a zero mode is not kept even when too few follow it to
 * make a run).
 */
function modesBeforeDeparture(descending: Float64Array, law: LawFit, from: number, tolerance: number, usable: number): number {
  let run = 0;
  for (let k = from; k <= descending.length; k++) {
    const lambda = descending[k - 1];
    const departed = !(lambda > 0) || Math.abs(lambda / Math.exp(law.intercept + law.slope * Math.log(k)) - 1) > tolerance;
    run = departed ? run + 1 : 0;
    if (run === KNEE_RUN) return Math.min(k - KNEE_RUN, usable);
  }
  return usable;
}

/** The self-consistent knee at one tolerance (steps 1–3 of `findKnee`). */
function kneeAt(descending: Float64Array, tolerance: number): { modesKept: number; law: LawFit } {
  const usable = countAbove(descending, 0);
  const first = Math.min(usable, Math.max(8, Math.ceil(Math.sqrt(descending.length))));
  if (first < 4) throw new RangeError('the knee finder needs at least 4 positive eigenvalues');
  let law = fitLaw(descending, first, false);
  let kept = modesBeforeDeparture(descending, law, first + 1, tolerance, usable);
  // a set so small that the first window holds every positive mode has nothing left to walk
  if (first === usable) return { modesKept: kept, law };
  const steps = new Map<number, LawFit>([[kept, law]]);
  for (let refit = 0; refit < KNEE_MAX_REFITS; refit++) {
    const window = Math.min(usable, Math.max(first, kept));
    const next = fitLaw(descending, window, window - 1 >= KNEE_MIN_CURVATURE_POINTS);
    const nextKept = modesBeforeDeparture(descending, next, first + 1, tolerance, usable);
    if (nextKept === kept) return { modesKept: kept, law: next };
    if (steps.has(nextKept)) {
      // a cycle between windows: keep its smallest knee, the cautious choice, with the law that gave it
      const order = [...steps.keys()];
      const smallest = Math.min(...order.slice(order.indexOf(nextKept)));
      return { modesKept: smallest, law: steps.get(smallest) as LawFit };
    }
    steps.set(nextKept, next);
    kept = nextKept;
    law = next;
  }
  return { modesKept: kept, law };
}

/**
 * Our knee finder, a heuristic of our own, validated on 2D diamonds against the continuum spectrum
 * N/(4x_k) of Afshordi–Aslanbeigi–Sorkin 2012 (JHEP 08 137) in tests/engine/kneeValidation.test.ts.
 * Above the knee a sprinkled spectrum follows a continuum-like law, close to a power law in the mode
 * number (2D diamond: N/(4x_k) ≈ N/(2πk)); below it the discrete spectrum falls away from that law
 * smoothly, by a relative amount growing about as k² (on 2D diamonds ≈ 3.4 (k/N)²), so there is no
 * corner to find: the knee is where the departure first exceeds `tolerance`. With M positive
 * eigenvalues λ_k (descending):
 *  1. Fit ln λ_k = ln a − p ln k − β (k/w)² by least squares over k = 2..w with weight k. Only
 *     a k^(−p) is the law; the β term takes up the departure already under way inside the window, which
 *     would otherwise steepen the fitted p and move the knee out. The weight k follows the sprinkling
 *     scatter, which falls with rank (single modes scatter 2–3 % at the top, 0.3 % near the knee at
 *     N = 1000), and keeps the first few modes, whose pattern depends on the region (slab, cylinder),
 *     from levering the fit.
 *  2. Walk down from k = w₀ + 1; the knee is the first k where |λ_k / (a k^(−p)) − 1| > tolerance for
 *     KNEE_RUN consecutive modes, and every mode above it is kept. If the spectrum never departs,
 *     every mode is kept.
 *  3. Start from w = w₀ = max(8, ⌈√M⌉) with β = 0, then refit with w = the number of modes kept until it
 *     stops changing: the law fitted to exactly the kept modes predicts the same knee. (If the refits
 *     cycle, the smallest knee of the cycle is taken.)
 * The rank range repeats steps 1–3 at half and 1.5 times the tolerance, to show how much the choice
 * of tolerance moves the knee. The fitted law, window, tolerance and range are returned so the choice
 * can be shown and audited; the cut it implies is a modelling choice like any other.
 */
export function findKnee(descending: Float64Array, tolerance = DEFAULT_KNEE_TOLERANCE): { modesKept: number; fit: KneeFit } {
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new RangeError('the knee tolerance must be a positive number');
  const { modesKept, law } = kneeAt(descending, tolerance);
  const lowTolerance = tolerance * 0.5;
  const highTolerance = tolerance * 1.5;
  const fit: KneeFit = {
    amplitude: Math.exp(law.intercept),
    exponent: -law.slope,
    curvature: law.curvature,
    fitWindow: law.window,
    tolerance,
    rankRange: {
      low: kneeAt(descending, lowTolerance).modesKept,
      high: kneeAt(descending, highTolerance).modesKept,
      lowTolerance,
      highTolerance,
    },
  };
  return { modesKept, fit };
}

/**
 * Applies a truncation rule to the positive eigenvalues of iΔ (descending) of an N-element causal set.
 * Each rule yields the cut λ_c and the number of positive modes kept.
 */
export function applyTruncation(descending: Float64Array, size: number, rule: TruncationRule): TruncationResult {
  switch (rule.rule) {
    case 'none':
      return { rule, cutoff: 0, modesKept: descending.length };
    case 'sqrtN': {
      const cutoff = sqrtNCutoff(size);
      return { rule, cutoff, modesKept: countAbove(descending, cutoff) };
    }
    case 'lambda':
      return { rule, cutoff: rule.cut, modesKept: countAbove(descending, rule.cut) };
    case 'modes': {
      if (rule.count > descending.length) {
        throw new RangeError(`modes:${rule.count} asks for more than the ${descending.length} positive eigenvalues of iΔ`);
      }
      return { rule, cutoff: cutBetween(descending, rule.count), modesKept: rule.count };
    }
    case 'knee': {
      const { modesKept, fit } = findKnee(descending, rule.tolerance ?? DEFAULT_KNEE_TOLERANCE);
      return { rule, cutoff: cutBetween(descending, modesKept), modesKept, knee: fit };
    }
  }
}
