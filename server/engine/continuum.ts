/**
 * Root of a continuous f on [lo, hi] with f(lo), f(hi) of opposite signs, by bisection to the last bit
 * (a bracketed solver: it cannot leave the bracket, so it cannot jump to a neighbouring root).
 */
export function bisectRoot(f: (x: number) => number, lo: number, hi: number): number {
  let flo = f(lo);
  const fhi = f(hi);
  if (flo === 0) return lo;
  if (fhi === 0) return hi;
  if (Math.sign(flo) === Math.sign(fhi)) throw new RangeError(`no sign change of f on [${lo}, ${hi}]`);
  for (let iter = 0; iter < 200; iter++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    const fm = f(mid);
    if (fm === 0) return mid;
    if (Math.sign(fm) === Math.sign(flo)) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The positive roots of tan x = 2x, written as sin x − 2x cos x = 0 (no poles): one in (0.5, π/2)
 * (x₁ ≈ 1.165561) and one in each (nπ, nπ + π/2) for n ≥ 1, where the function changes sign.
 */
export function tanEqualsTwoXRoots(count: number): Float64Array {
  const g = (x: number) => Math.sin(x) - 2 * x * Math.cos(x);
  const roots = new Float64Array(count);
  for (let n = 0; n < count; n++) {
    const lo = n === 0 ? 0.5 : n * Math.PI;
    roots[n] = bisectRoot(g, lo, n * Math.PI + Math.PI / 2);
  }
  return roots;
}

/**
 * Continuum spectrum of iΔ for N elements in a 2D causal diamond (Afshordi–Aslanbeigi–Sorkin 2012,
 * JHEP 08 137; recalled from memory and confirmed numerically, server/engine/README.md §8): the k-th largest
 * positive eigenvalue is N/(4 x_k), the x_k being nπ (n ≥ 1) and the positive roots of tan x = 2x,
 * merged in ascending order. Returns the first `count`, descending.
 */
export function continuumDiamondSpectrum(size: number, count: number): Float64Array {
  const roots = tanEqualsTwoXRoots(count);
  const xs: number[] = [];
  for (let n = 1; n <= count; n++) xs.push(n * Math.PI);
  xs.push(...roots);
  xs.sort((a, b) => a - b);
  return Float64Array.from(xs.slice(0, count), (x) => size / (4 * x));
}

/**
 * The continuum trend of the mutual information of two intervals of lengths ℓ₁, ℓ₂ a distance d apart
 * in a c = 1 vacuum (Calabrese–Cardy 2004, J. Stat. Mech. P06002; Casini–Huerta 2009, J. Phys. A 42
 * 504007): I ≈ (1/3) ln[(ℓ₁ + d)(ℓ₂ + d) / (d(ℓ₁ + ℓ₂ + d))] — exact for a free Dirac fermion, a trend
 * for the boson (server/engine/README.md §15). A sub-diamond of proper time ℓ stands for its base
 * interval of length ℓ.
 */
export function continuumMutualInformation(lengthA: number, lengthB: number, separation: number): number {
  if (!(lengthA > 0 && lengthB > 0 && separation > 0)) throw new RangeError('interval lengths and the separation must be positive');
  return Math.log(((lengthA + separation) * (lengthB + separation)) / (separation * (lengthA + lengthB + separation))) / 3;
}
