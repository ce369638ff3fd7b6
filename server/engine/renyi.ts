import { renyiKey, type RenyiOrder } from '@shared/vacuum';

/**
 * The larger member μ ≥ 1 of each pair (μ, 1 − μ) of generalised eigenvalues, given descending as
 * EntropyResult.generalizedEigenvalues holds them; a μ a rounding below 1 (a pure mode) is held at 1,
 * as the von Neumann sum holds κ at ½.
 */
function upperMembers(mu: ArrayLike<number>): Float64Array {
  const half = Math.floor(mu.length / 2);
  const upper = new Float64Array(half);
  for (let i = 0; i < half; i++) upper[i] = Math.max(mu[i], 1);
  return upper;
}

/**
 * Rényi entropy of order α of a Gaussian state from its generalised eigenvalues μ of W v = μ iΔ v
 * (server/engine/README.md §15; the standard bosonic Gaussian-state formula): for α > 0, α ≠ 1,
 * S_α = Σ_{μ>1} ln(μ^α − (μ−1)^α)/(α − 1); the min-entropy S_∞ = Σ_{μ>1} ln μ; α = 1 gives the von
 * Neumann S = Σ [μ ln μ − (μ−1) ln(μ−1)]. ln(μ^α − (μ−1)^α) is taken as α ln μ + ln(1 − r^α) with
 * r = (μ−1)/μ < 1 and 1 − r^α = −expm1(α log1p(−1/μ)), which neither overflows for large μ^α, nor loses
 * the small difference near μ = 1, nor the one of r^α near 1 (large μ, small α).
 */
export function renyiEntropy(mu: ArrayLike<number>, order: RenyiOrder | 1): number {
  const upper = upperMembers(mu);
  let sum = 0;
  for (const m of upper) {
    if (m === 1) continue;
    if (order === 'inf') sum += Math.log(m);
    else if (order === 1) sum += m * Math.log(m) - (m - 1) * Math.log(m - 1);
    else {
      const oneMinusRToAlpha = -Math.expm1(order * Math.log1p(-1 / m));
      sum += (order * Math.log(m) + Math.log(oneMinusRToAlpha)) / (order - 1);
    }
  }
  return sum;
}

/** S_α for each order, keyed by renyiKey ("0.5", "2", "inf"). */
export function renyiEntropies(mu: ArrayLike<number>, orders: readonly RenyiOrder[]): Record<string, number> {
  return Object.fromEntries(orders.map((order) => [renyiKey(order), renyiEntropy(mu, order)]));
}
