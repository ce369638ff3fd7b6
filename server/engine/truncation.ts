import type { TruncationRule } from '../../shared/vacuum';

export interface KneeFit {
  /** fitted λ_k ≈ amplitude · k^(−exponent) over k = 2..fitWindow */
  amplitude: number;
  exponent: number;
  fitWindow: number;
  tolerance: number;
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

/**
 * Our knee finder. Above the knee a sprinkled spectrum follows the continuum, which at the top of the
 * spectrum is close to a power law in the mode number (for the 2D diamond λ_k ≈ N/(4x_k) with x_k
 * growing linearly in k, physics notes §4); past the knee the discrete spectrum leaves that curve.
 *  1. Fit log λ_k = log a − p log k by least squares over the window k = 2..w, with
 *     w = max(8, ⌈√M⌉) of the M positive eigenvalues: far enough above the knee (which sits beyond 2√N
 *     modes in 2D) to see only continuum-like modes, long enough to average out sprinkling noise. The
 *     first mode is left out because it sits off the asymptotic law (for the 2D diamond x₁ ≈ 1.166
 *     against ≈ π/2 for a straight 1/k law).
 *  2. Walk down from k = w + 1 and compare λ_k with the fitted a k^(−p).
 *  3. The knee is the first k where |ln(λ_k / a k^(−p))| > ln(1 + tolerance) for KNEE_RUN consecutive
 *     modes; everything above it is kept. If the spectrum never departs, every mode is kept.
 * The fitted curve, window and tolerance are returned so the choice can be shown and audited.
 */
export function findKnee(descending: Float64Array, tolerance = DEFAULT_KNEE_TOLERANCE): { modesKept: number; fit: KneeFit } {
  const m = descending.length;
  const usable = countAbove(descending, 0);
  const window = Math.min(usable, Math.max(8, Math.ceil(Math.sqrt(m))));
  if (window < 4) throw new RangeError('the knee finder needs at least 4 positive eigenvalues');
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let sxy = 0;
  const points = window - 1;
  for (let k = 2; k <= window; k++) {
    const x = Math.log(k);
    const y = Math.log(descending[k - 1]);
    sx += x;
    sy += y;
    sxx += x * x;
    sxy += x * y;
  }
  const slope = (points * sxy - sx * sy) / (points * sxx - sx * sx);
  const intercept = (sy - slope * sx) / points;
  const fit: KneeFit = { amplitude: Math.exp(intercept), exponent: -slope, fitWindow: window, tolerance };
  const limit = Math.log(1 + tolerance);
  let run = 0;
  for (let k = window + 1; k <= m; k++) {
    const lambda = descending[k - 1];
    const departed = !(lambda > 0) || Math.abs(Math.log(lambda) - intercept - slope * Math.log(k)) > limit;
    run = departed ? run + 1 : 0;
    if (run === KNEE_RUN) return { modesKept: k - KNEE_RUN, fit };
  }
  return { modesKept: m, fit };
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
