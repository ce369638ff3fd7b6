import { describe, expect, it } from 'vitest';
import { orderSummary } from '../../server/engine/orderAlgorithms';
import { computeVacuum } from '../../server/engine';
import { entanglementEntropy, subregionElements } from '../../server/engine/entropy';
import { masslessRetardedGreen, retardedGreen, retardedGreenOperator } from '../../server/engine/green';
import { getBackend } from '../../server/engine/linalg';
import { mlMatrixBackend } from '../../server/engine/linalg/mlMatrixBackend';
import { nativeBackendStatus } from '../../server/engine/linalg/nativeBackend';
import { causalMatrix, imageCount } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { makeRegion } from '../../server/engine/regions';
import { sjState } from '../../server/engine/sjState';
import { sprinkle } from '../../server/engine/sprinkle';
import { computeStudyCell } from '../../server/studies/cell';
import { applyTruncation } from '../../server/engine/truncation';
import { runPython } from '../support/python';

/**
 * The cylinder x ~ x + L. Reference: the method of images for the 2D wave equation — the massless
 * retarded Green function on the cylinder is the sum of the flat one over the images y + nL, so
 * K[x][y] = ½ · #{n ∈ ℤ : y + nL ≺ x} (Johnston 2008's ½Cᵀ on the universal cover, summed over the
 * covering) — computed by numpy below by summing the images itself, with no code of the engine: then
 * Δ = K − Kᵀ, the eigenpairs of iΔ by numpy.linalg.eigh on the complex Hermitian matrix, the SJ state
 * W = positive part of iΔ (Sorkin 2011; Afshordi–Aslanbeigi–Sorkin 2012), Sorkin's spacetime
 * entanglement entropy from W_O v = μ iΔ_O v, S = Σ μ ln|μ| (Sorkin 2012; Saravani–Sorkin–Yazdi 2014),
 * and the double truncation of Sorkin–Yazdi 2018 (√N/(4π) on the whole set, √n/(4π) on the
 * restriction). A massive field: K_m = Φ (I + (m²/ρ) Φ)⁻¹ (Johnston 2008/2009) with a dense numpy inverse.
 */
const referenceScript = String.raw`
import json, sys
import numpy as np
d = json.load(sys.stdin)
pts = np.array(d['points']).reshape(-1, 2); t, x = pts[:, 0], pts[:, 1]; N = len(t)
L = d['L']; rho = d['density']; m = d['mass']

# method of images: count[i, j] = #{n : (t_i, x_i + nL) in the causal past of (t_j, x_j)}
dt = t[None, :] - t[:, None]; dx = x[None, :] - x[:, None]
reach = int(np.ceil(np.ptp(t) / L)) + 2
count = np.zeros((N, N))
for n in range(-reach, reach + 1):
    count += (dt > np.abs(dx - n * L))
related = count > 0
links = related & ((related.astype(float) @ related.astype(float)) == 0)

def sep(v):
    r = np.abs(v) % L
    return np.minimum(r, L - r)
(pt, px), (qt, qx) = d['past'], d['future']
sub = np.where((t - pt > sep(x - px)) & (qt - t > sep(qx - x)))[0]

def entropy(W, iD, cut):
    Wo = W[np.ix_(sub, sub)]; Ao = iD[np.ix_(sub, sub)]
    e, U = np.linalg.eigh(Ao)
    keep = np.abs(e) > cut(np.abs(e).max())
    U = U[:, keep]
    mu = np.linalg.eigvals(np.diag(1 / e[keep]) @ U.conj().T @ Wo @ U).real
    mu = mu[(np.abs(mu) > 1e-12) & (np.abs(mu - 1) > 1e-12)]
    return float(np.sum(mu * np.log(np.abs(mu))))

def vacuum(multiplicity):
    phi = 0.5 * multiplicity.T
    K = phi if m == 0 else phi @ np.linalg.inv(np.eye(N) + (m * m / rho) * phi)
    iD = 1j * (K - K.T)
    ev, V = np.linalg.eigh(iD)
    pos = ev > 0
    W = (V[:, pos] * ev[pos]) @ V[:, pos].conj().T
    lc = np.sqrt(N) / (4 * np.pi)
    kept = np.abs(ev) > lc
    Vk = V[:, kept]
    iDc = (Vk * ev[kept]) @ Vk.conj().T
    pk = ev > lc
    Wc = (V[:, pk] * ev[pk]) @ V[:, pk].conj().T
    return {
        'positive': sorted(ev[pos].tolist(), reverse=True),
        'S': entropy(W, iD, lambda top: 1e-6 * top),
        'Sdouble': entropy(Wc, iDc, lambda top: np.sqrt(len(sub)) / (4 * np.pi)),
        'kept': int(pk.sum()),
    }

out = {
    'images': vacuum(count),
    'n': int(len(sub)),
    'relations': int(related.sum()),
    'imageSum': int(count.sum()),
    'multiPairs': int((count >= 2).sum()),
    'links': int(links.sum()),
    'count': count.flatten(order='F').astype(int).tolist(),
}
if d['zeroOne']:
    out['zeroOne'] = vacuum(related.astype(float))
print(json.dumps(out))
`;

interface Vacuum {
  positive: number[];
  S: number;
  Sdouble: number;
  kept: number;
}
interface Reference {
  images: Vacuum;
  zeroOne?: Vacuum;
  n: number;
  relations: number;
  imageSum: number;
  multiPairs: number;
  links: number;
  /** column-major image counts, entry (i, j) = #{n : image of i ≺ j} */
  count: number[];
}

const L = 2;
const subregion = { kind: 'diamond' as const, past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } };
const wrapped = { region: { kind: 'cylinder2d' as const, properTime: 3, circumference: L }, process: 'fixed' as const, count: 400, seed: 'cylinder-images', prng: 'arc4' as const };

function reference(points: Float64Array, density: number, mass: number, zeroOne = false): Reference {
  return runPython<Reference>(referenceScript, { points: Array.from(points), L, density, mass, past: [-0.5, 0], future: [0.5, 0], zeroOne });
}

function relative(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

/** Compares the modes above the √N/(4π) cut relatively and the whole spectrum relative to λ_max. */
function expectSpectrum(engine: Float64Array, numpy: number[], kept: number): void {
  expect(engine.length).toBe(numpy.length);
  for (let k = 0; k < kept; k++) expect(relative(engine[k], numpy[k])).toBeLessThan(1e-9);
  for (let k = 0; k < numpy.length; k++) expect(Math.abs(engine[k] - numpy[k]) / numpy[0]).toBeLessThan(1e-7);
}

describe('cylinder diamond with T > L: the Green function counts images', () => {
  it('matches a numpy image sum: spectrum, S untruncated and double-truncated (massless)', async () => {
    const untruncated = await computeVacuum({ source: { kind: 'sprinkling', sprinkling: wrapped }, truncation: { rule: 'none' }, subregion });
    const double = await computeVacuum({ source: { kind: 'sprinkling', sprinkling: wrapped }, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true });
    const ref = reference(untruncated.points, untruncated.density!, 0, true);
    // the test is meaningful only when many pairs are joined through two images
    expect(ref.multiPairs).toBeGreaterThan(5000);
    expect(untruncated.entropy!.n).toBe(ref.n);
    expectSpectrum(untruncated.eigenvalues, ref.images.positive, ref.images.kept);
    expect(double.modesKept).toBe(ref.images.kept);
    expect(relative(untruncated.entropy!.S, ref.images.S)).toBeLessThan(1e-6);
    expect(relative(double.entropy!.S, ref.images.Sdouble)).toBeLessThan(1e-6);
    // ½ × the 0/1 causal matrix (the code before images were counted) is far off on the same points
    const zeroOne = ref.zeroOne!;
    expect(relative(zeroOne.positive[0], ref.images.positive[0])).toBeGreaterThan(0.1);
    expect(relative(zeroOne.S, ref.images.S)).toBeGreaterThan(0.02);
    expect(relative(zeroOne.Sdouble, ref.images.Sdouble)).toBeGreaterThan(0.1);
  });

  it('matches the numpy image sum for a massive field (m = 1): spectrum and S', async () => {
    const mass = 1;
    const untruncated = await computeVacuum({ source: { kind: 'sprinkling', sprinkling: wrapped }, mass, truncation: { rule: 'none' }, subregion });
    const double = await computeVacuum({ source: { kind: 'sprinkling', sprinkling: wrapped }, mass, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true });
    const ref = reference(untruncated.points, untruncated.density!, mass);
    expectSpectrum(untruncated.eigenvalues, ref.images.positive, ref.images.kept);
    expect(relative(untruncated.entropy!.S, ref.images.S)).toBeLessThan(1e-6);
    expect(relative(double.entropy!.S, ref.images.Sdouble)).toBeLessThan(1e-6);
  });

  it('gives the same spectrum and S in a study cell (server/studies/cell.ts)', async () => {
    const cell = await computeStudyCell({
      sprinkling: wrapped,
      mass: 0,
      subregions: [{ key: 'central', label: 'central diamond', fraction: null, past: subregion.past, future: subregion.future }],
      rules: [
        { truncation: { rule: 'none' }, doubleTruncation: false },
        { truncation: { rule: 'sqrtN' }, doubleTruncation: true },
      ],
    });
    const ref = reference(sprinkle(wrapped).points, cell.density!, 0);
    expectSpectrum(cell.eigenvalues, ref.images.positive, ref.images.kept);
    const [untruncated, double] = cell.entropies;
    expect(untruncated.n).toBe(ref.n);
    expect(relative(untruncated.S, ref.images.S)).toBeLessThan(1e-6);
    expect(relative(double.S, ref.images.Sdouble)).toBeLessThan(1e-6);
  });

  it('counts each pair’s images as numpy does, and keeps the order itself 0/1', () => {
    const s = sprinkle(wrapped);
    const ref = reference(s.points, s.density, 0);
    const causal = causalMatrix(s.points, 2, L);
    const n = s.count;
    // K = ½ · image count, entry for entry (the counts are small integers: exact)
    const k = masslessRetardedGreen({ points: s.points, dimension: 2, causal, periodX: L });
    const expectedK = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expectedK[j + i * n] = 0.5 * ref.count[i + j * n];
    expect(Array.from(k.data)).toEqual(Array.from(expectedK));
    let most = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) most = Math.max(most, imageCount(s.points, i, j, L));
    // near the tips of a T = 3 diamond on L = 2 a pair can even see three images (n = 0, ±1)
    expect(most).toBeGreaterThanOrEqual(2);
    // the order: relations, links and ordering fraction are those of the 0/1 causal matrix
    expect(ref.imageSum).toBeGreaterThan(ref.relations);
    const summary = orderSummary(causal);
    expect(summary.relations).toBe(ref.relations);
    expect(summary.links).toBe(ref.links);
    expect(summary.orderingFraction).toBe(ref.relations / ((n * (n - 1)) / 2));
  });

  it('reports the 0/1 relation count from the pipeline', async () => {
    const result = await computeVacuum({ source: { kind: 'points', points: sprinkle(wrapped).points, dimension: 2, region: wrapped.region }, truncation: { rule: 'sqrtN' } });
    expect(result.relations).toBe(causalMatrix(result.points, 2, L).count());
    expect(result.links).toBeNull();
  });

  it.runIf(nativeBackendStatus().backend !== null)('native gram of a Δ with entries ±½ and ±1 leaves the 0/±h route (exact ΔᵀΔ)', () => {
    // Every entry of ΔᵀΔ here is a multiple of ¼ far below 2^53, so the plain double sum is exact: the
    // native result must equal ml-matrix bit for bit, whichever magnitude comes first in memory.
    const s = sprinkle(wrapped);
    const delta = pauliJordan(retardedGreenOperator({ points: s.points, dimension: 2, causal: causalMatrix(s.points, 2, L), periodX: L }));
    const magnitudes = new Set(Array.from(delta.data, Math.abs));
    expect(magnitudes.has(0.5) && magnitudes.has(1)).toBe(true);
    const native = getBackend('native');
    expect(Array.from(native.gram(delta).data)).toEqual(Array.from(mlMatrixBackend.gram(delta).data));
    const first = delta.data.findIndex((v) => v !== 0);
    const n = delta.rows;
    const flipped = { ...delta, data: Float64Array.from(delta.data) };
    const [i, j] = [first % n, Math.floor(first / n)];
    const other = Math.abs(delta.data[first]) === 0.5 ? 2 : 0.5;
    flipped.data[first] *= other;
    flipped.data[j + i * n] *= other;
    expect(Array.from(native.gram(flipped).data)).toEqual(Array.from(mlMatrixBackend.gram(flipped).data));
  });
});

describe('cylinder diamond with T ≤ L: nothing moves', () => {
  const spec = { region: { kind: 'cylinder2d' as const, properTime: 1.9, circumference: L }, process: 'fixed' as const, count: 300, seed: 'cylinder-unwrapped', prng: 'arc4' as const };

  it('gives K = ½Cᵀ exactly (no pair has two images), massless and massive', () => {
    const s = sprinkle(spec);
    // move the seam to the middle of the diamond (x → x + L/2, wrapped), so that many pairs are
    // related only across it and the image count is really exercised
    const points = Float64Array.from(s.points);
    for (let i = 0; i < s.count; i++) points[2 * i + 1] = ((s.points[2 * i + 1] + L) % L) - L / 2;
    const causal = causalMatrix(points, 2, L);
    expect(Array.from(causal.words)).toEqual(Array.from(causalMatrix(s.points, 2, L).words));
    let acrossSeam = 0;
    causal.forEach((i, j) => {
      if (!(points[2 * j] - points[2 * i] > Math.abs(points[2 * j + 1] - points[2 * i + 1]))) acrossSeam++;
    });
    expect(acrossSeam).toBeGreaterThan(1000);
    const flat = { points, dimension: 2 as const, causal, density: s.density };
    const periodic = { ...flat, periodX: L };
    expect(Array.from(masslessRetardedGreen(periodic).data)).toEqual(Array.from(masslessRetardedGreen(flat).data));
    expect(Array.from(pauliJordan(retardedGreenOperator(periodic)).data)).toEqual(Array.from(pauliJordan(retardedGreenOperator(flat)).data));
    expect(Array.from(retardedGreen({ ...periodic, mass: 1 }).data)).toEqual(Array.from(retardedGreen({ ...flat, mass: 1 }).data));
  });

  it('gives the double-truncated S of the code path with K = ½Cᵀ', async () => {
    const backend = getBackend();
    const result = await computeVacuum({ source: { kind: 'sprinkling', sprinkling: spec }, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true, backend });
    // the previous path, by hand: the cylinder's causal matrix, K = ½Cᵀ, no image count
    const points = result.points;
    const causal = causalMatrix(points, 2, L);
    const delta = pauliJordan(retardedGreenOperator({ points, dimension: 2, causal }));
    const spectrum = pauliJordanSpectrum(delta, { backend });
    const truncation = applyTruncation(spectrum.positive, result.N, { rule: 'sqrtN' });
    const state = sjState(delta, spectrum, truncation, backend);
    const elements = subregionElements(subregion, points, 2, makeRegion(spec.region).periodX);
    const previous = entanglementEntropy(state, elements, { doubleTruncation: true, backend });
    expect(result.entropy!.n).toBe(previous.n);
    expect(relative(result.entropy!.S, previous.S)).toBeLessThan(1e-10);
    expect(result.entropy!.S).toBeGreaterThan(0.1);
  });
});

describe('cylinder Green function input', () => {
  it('rejects a periodic x in 4D, a bad period and missing coordinates', () => {
    const causal = causalMatrix(new Float64Array([0, 0, 1, 0]), 2, L);
    expect(() => retardedGreenOperator({ points: new Float64Array(8), dimension: 4, causal, periodX: L, density: 1 })).toThrow(/2D only/);
    expect(() => retardedGreenOperator({ points: new Float64Array([0, 0, 1, 0]), dimension: 2, causal, periodX: -1 })).toThrow(/positive finite/);
    expect(() => retardedGreenOperator({ points: new Float64Array(0), dimension: 2, causal, periodX: L })).toThrow(/coordinates of all 2 elements/);
  });
});
