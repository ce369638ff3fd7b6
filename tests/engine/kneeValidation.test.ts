/**
 * Validation of our knee finder (server/engine/truncation.ts findKnee) against an outside yardstick:
 * the continuum spectrum of iΔ on a 2D causal diamond, λ_k ≈ N/(4x_k) with x_k the numbers nπ and the
 * positive roots of tan x = 2x (Afshordi–Aslanbeigi–Sorkin 2012, JHEP 08 137; recalled from memory and
 * confirmed numerically — with numpy on single sprinklings at N = 1000–2000, and by tests/engine/
 * continuum.test.ts). The knee finder never sees that curve: it must find, from the spectrum alone,
 * the rank where the sprinkled spectrum leaves the continuum.
 */
import { describe, expect, it } from 'vitest';
import { continuumDiamondSpectrum } from '../../server/engine/continuum';
import { masslessGreenRelation } from '../../server/engine/green';
import { backendSelection, getBackend } from '../../server/engine/linalg';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { seededUniform, sprinkle } from '../../server/engine/sprinkle';
import { applyTruncation, findKnee } from '../../server/engine/truncation';

/**
 * Our yardstick for "where the spectrum leaves the continuum": the number of leading modes before the
 * first run of DEPARTURE_RUN consecutive ranks j with |λ_j / λ_j^cont − 1| > tolerance. A run is needed
 * because single modes scatter (2–3 % at the top of an N = 1000 spectrum, 0.3 % near the knee), so one
 * mode past the tolerance is noise; past the knee the departure grows steadily, so the run's length
 * hardly matters: on 48 sprinklings (N = 1000, 2000, 4000, 16 seeds each) runs of 5, 10 and 20 gave
 * the same rank at tolerance 5 % in 44 cases, and in the other 4 the run of 5 started at most 9 ranks earlier.
 */
const DEPARTURE_RUN = 10;
function continuumDepartureRank(spectrum: Float64Array, continuum: Float64Array, tolerance: number): number {
  let run = 0;
  for (let k = 1; k <= spectrum.length; k++) {
    run = Math.abs(spectrum[k - 1] / continuum[k - 1] - 1) > tolerance ? run + 1 : 0;
    if (run === DEPARTURE_RUN) return k - DEPARTURE_RUN;
  }
  return spectrum.length;
}

/** Positive eigenvalues of iΔ (eigenvalues only) for a fixed-N sprinkling of the diamond of proper time 2. */
const spectra = new Map<string, Float64Array>();
function diamondSpectrum(size: number, seed: number): Float64Array {
  const key = `${size}-${seed}`;
  const cached = spectra.get(key);
  if (cached) return cached;
  const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: size, seed: `knee-${key}`, prng: 'arc4' });
  const delta = pauliJordan(masslessGreenRelation({ points: s.points, dimension: 2, causal: causalMatrix(s.points, 2) }));
  const positive = pauliJordanSpectrum(delta, { vectors: false, backend: getBackend() }).positive;
  spectra.set(key, positive);
  return positive;
}

// N = 2000 and 4000 take seconds on OpenBLAS (what CI runs) but minutes on the JavaScript fallback,
// which therefore checks N = 1000 on one seed only.
const native = backendSelection().name === 'native';
const onNativeOnly = native ? '' : ' — skipped: ml-matrix backend, would take minutes';
const cases: { size: number; seeds: number[]; nativeOnly: boolean }[] = [
  { size: 1000, seeds: native ? [1, 2, 3, 4] : [1], nativeOnly: false },
  { size: 2000, seeds: [1, 2], nativeOnly: true },
  { size: 4000, seeds: [1], nativeOnly: true },
];

describe('the knee against the continuum of the 2D diamond', () => {
  for (const { size, seeds, nativeOnly } of cases) {
    it.skipIf(nativeOnly && !native)(`lands within ±10 % of the 5 % departure rank at N = ${size}${nativeOnly ? onNativeOnly : ''}`, () => {
      for (const seed of seeds) {
        const spectrum = diamondSpectrum(size, seed);
        const departure = continuumDepartureRank(spectrum, continuumDiamondSpectrum(size, spectrum.length), 0.05);
        // on 2D diamonds the spectrum leaves the continuum near k ≈ 0.124 N at 5 % (our measurement, 48 sprinklings)
        expect(departure / size).toBeGreaterThan(0.11);
        expect(departure / size).toBeLessThan(0.135);
        const knee = applyTruncation(spectrum, size, { rule: 'knee' });
        expect(knee.knee?.tolerance).toBe(0.05);
        expect(Math.abs(knee.modesKept / departure - 1)).toBeLessThan(0.1);
        // the fitted law is the continuum's asymptotic N/(2πk) (x_k → kπ/2)
        expect(Math.abs((knee.knee?.exponent ?? 0) - 1)).toBeLessThan(0.01);
        expect(Math.abs((knee.knee?.amplitude ?? 0) / (size / (2 * Math.PI)) - 1)).toBeLessThan(0.02);
      }
    });
  }

  it.skipIf(!native)(`brackets the knee with the ranks at half and 1.5 times the tolerance, each near its own departure rank${onNativeOnly}`, () => {
    for (const size of [2000, 4000]) {
      const spectrum = diamondSpectrum(size, 1);
      const continuum = continuumDiamondSpectrum(size, spectrum.length);
      const { modesKept, fit } = findKnee(spectrum, 0.05);
      expect(fit.rankRange.lowTolerance).toBeCloseTo(0.025, 15);
      expect(fit.rankRange.highTolerance).toBeCloseTo(0.075, 15);
      expect(fit.rankRange.low).toBe(findKnee(spectrum, 0.025).modesKept);
      expect(fit.rankRange.high).toBe(findKnee(spectrum, 0.075).modesKept);
      expect(fit.rankRange.low).toBeLessThan(modesKept);
      expect(fit.rankRange.high).toBeGreaterThan(modesKept);
      // at N = 1000 a 2.5 % tolerance is as small as the scatter of single top modes, so the low end is
      // checked from N = 2000 (measured: within 8 % there, up to 24 % off at N = 1000)
      expect(Math.abs(fit.rankRange.low / continuumDepartureRank(spectrum, continuum, 0.025) - 1)).toBeLessThan(0.1);
      expect(Math.abs(fit.rankRange.high / continuumDepartureRank(spectrum, continuum, 0.075) - 1)).toBeLessThan(0.1);
    }
  });

  it('keeps more modes than the Sorkin–Yazdi cut and stores the range with the run’s truncation', () => {
    const spectrum = diamondSpectrum(1000, 1);
    const knee = applyTruncation(spectrum, 1000, { rule: 'knee', tolerance: 0.08 });
    // Sorkin–Yazdi 2018 (CQG 35 074004): λ_c = √N/(4π) keeps about 2√N ≈ 63 modes; the 5 % knee is near 0.12 N
    expect(knee.modesKept).toBeGreaterThan(applyTruncation(spectrum, 1000, { rule: 'sqrtN' }).modesKept);
    const range = knee.knee?.rankRange;
    expect(range?.lowTolerance).toBeCloseTo(0.04, 15);
    expect(range?.highTolerance).toBeCloseTo(0.12, 15);
    expect(range?.low).toBe(findKnee(spectrum, 0.04).modesKept);
    expect(range?.high).toBe(findKnee(spectrum, 0.12).modesKept);
    expect(spectrum[knee.modesKept - 1]).toBeGreaterThan(knee.cutoff);
    expect(spectrum[knee.modesKept]).toBeLessThanOrEqual(knee.cutoff);
  });
});

describe('the knee on a spectrum of known shape (worked example)', () => {
  // λ_k = A k^(−p) exp(−(k/k₀)²): a power law with a departure growing as k², the form the finder models,
  // so the law and the knee are known exactly: |λ_k / (A k^(−p)) − 1| > τ from k* = k₀ √(−ln(1 − τ)).
  const A = 50;
  const k0 = 300;
  const shaped = (p: number) => Float64Array.from({ length: 1000 }, (_, i) => A * (i + 1) ** -p * Math.exp(-(((i + 1) / k0) ** 2)));

  it('recovers the law and the knee for exponents other than 2D’s p = 1', () => {
    for (const p of [0.3, 1, 1.5]) {
      const { modesKept, fit } = findKnee(shaped(p), 0.05);
      expect(fit.exponent).toBeCloseTo(p, 8);
      expect(fit.amplitude).toBeCloseTo(A, 6);
      expect(modesKept).toBe(Math.floor(k0 * Math.sqrt(-Math.log(1 - 0.05))));
      expect(fit.rankRange.low).toBe(Math.floor(k0 * Math.sqrt(-Math.log(1 - 0.025))));
      expect(fit.rankRange.high).toBe(Math.floor(k0 * Math.sqrt(-Math.log(1 - 0.075))));
    }
  });

  it('stays within 10 % of k* under 1 % multiplicative noise', () => {
    const uniform = seededUniform('knee-noise');
    const noisy = shaped(0.5).map((v) => v * (1 + 0.01 * (2 * uniform() - 1)));
    const truth = k0 * Math.sqrt(-Math.log(1 - 0.05));
    expect(Math.abs(findKnee(noisy, 0.05).modesKept / truth - 1)).toBeLessThan(0.1);
  });

  it('refuses a spectrum too short to fit and a tolerance that is not positive', () => {
    expect(() => findKnee(Float64Array.from([3, 2, 1]))).toThrow(/at least 4 positive eigenvalues/);
    expect(() => findKnee(shaped(1), 0)).toThrow(/tolerance must be a positive number/);
    expect(() => findKnee(shaped(1), Number.NaN)).toThrow(/tolerance must be a positive number/);
  });

  it('never keeps a zero mode', () => {
    // a zero eigenvalue counts as departed even when too few modes follow it to complete a run
    expect(findKnee(Float64Array.from([5, 4, 3, 2, 1, 0, 0, 0])).modesKept).toBe(5);
  });
});
