import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { continuumDiamondSpectrum } from '../../server/engine/continuum';
import { entanglementEntropy, subregionElements } from '../../server/engine/entropy';
import { retardedGreen } from '../../server/engine/green';
import { getBackend } from '../../server/engine/linalg';
import type { DenseMatrix } from '../../server/engine/linalg/backend';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sjState } from '../../server/engine/sjState';
import { sprinkle } from '../../server/engine/sprinkle';
import { applyTruncation, sqrtNCutoff } from '../../server/engine/truncation';
import { pauliJordan2DFromPoints } from '../../server/engine/structured/dominance2d';
import { chooseEngine, maxElements, STRUCTURED_MAX_N_2D } from '../../server/engine/structured/engineChoice';
import { factoredEntropy } from '../../server/engine/structured/factoredEntropy';
import { applyWightman, factoredState, factoredTrace } from '../../server/engine/structured/factoredState';
import { topSkewPairs } from '../../server/engine/structured/lanczos';
import { computeVacuum, EngineInputError } from '../../server/engine';
import { diamond300Points } from '../support/diamond300';

function denseDelta(points: Float64Array, mass = 0, density?: number): DenseMatrix {
  return pauliJordan(retardedGreen({ points, dimension: 2, causal: causalMatrix(points, 2), mass, density }));
}

function denseApply(delta: DenseMatrix, w: Float64Array): Float64Array {
  const n = delta.rows;
  const out = new Float64Array(n);
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) out[i] += delta.data[i + j * n] * w[j];
  return out;
}

const diamond = (count: number, seed: string) =>
  sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count, seed, prng: 'arc4' });
const halfDiamond = { kind: 'diamond' as const, past: { t: -Math.SQRT1_2, x: 0 }, future: { t: Math.SQRT1_2, x: 0 } };

describe('2D dominance-sum operator against the brute-force dense Δ (common practice for fast operators)', () => {
  it('equals Δw exactly for integer vectors (every partial sum is an exact half-integer)', () => {
    const s = diamond(250, 'matvec');
    const delta = denseDelta(s.points);
    const op = pauliJordan2DFromPoints(s.points);
    const w = Float64Array.from({ length: 250 }, (_, i) => ((i * 7919) % 23) - 11);
    const out = new Float64Array(250);
    op.apply(w, out);
    expect(Array.from(out)).toEqual(Array.from(denseApply(delta, w)));
  });

  it('handles ties in u and v (lattice points: equal light-cone coordinates are unrelated)', () => {
    const points: number[] = [];
    for (let a = 0; a < 9; a++) for (let b = 0; b < 9; b++) points.push((a + b) / 2, (a - b) / 2);
    const p = Float64Array.from(points);
    const op = pauliJordan2DFromPoints(p);
    const w = Float64Array.from({ length: 81 }, (_, i) => (i % 5) - 2);
    const out = new Float64Array(81);
    op.apply(w, out);
    expect(Array.from(out)).toEqual(Array.from(denseApply(denseDelta(p), w)));
  });

  it('massive Δ by substitution in the sweep order matches the dense unit-triangular solve', () => {
    const s = diamond(300, 'massive');
    const delta = denseDelta(s.points, 2, s.density);
    const op = pauliJordan2DFromPoints(s.points, { mass: 2, density: s.density });
    const w = Float64Array.from({ length: 300 }, (_, i) => Math.sin(i));
    const out = new Float64Array(300);
    op.apply(w, out);
    const expected = denseApply(delta, w);
    const scale = Math.max(...expected.map(Math.abs));
    for (let i = 0; i < 300; i++) expect(Math.abs(out[i] - expected[i])).toBeLessThan(1e-12 * scale);
  });

  it('rejects a massive field without a density', () => {
    expect(() => pauliJordan2DFromPoints(new Float64Array([0, 0, 1, 0]), { mass: 1 })).toThrow(/density/);
  });
});

// Source: fixtures/diamond300.ref.json — numpy 1.24.2 / LAPACK on exactly the points of fixtures/diamond300.csv
describe('structured engine on the diamond300 reference (server/engine/README.md §13)', () => {
  const ref = JSON.parse(readFileSync(new URL('../../fixtures/diamond300.ref.json', import.meta.url), 'utf8'));
  const points = diamond300Points();
  it('eigenvalues above the cut and the double-truncated S', () => {
    const pairs = topSkewPairs(pauliJordan2DFromPoints(points), { cut: ref.lam_cut });
    expect(pairs.sigma.length).toBe(ref.n_pos_above_cut);
    for (let i = 0; i < pairs.sigma.length; i++) expect(Math.abs(pairs.sigma[i] / ref.positive_eigs[i] - 1)).toBeLessThan(1e-8);
    const elements = subregionElements(halfDiamond, points, 2);
    const e = factoredEntropy(factoredState(pairs, ref.lam_cut), elements, { doubleTruncation: true });
    expect(e.n).toBe(ref.n_sub);
    expect(e.modesKept).toBe(ref.kept_sub_tr);
    expect(Math.abs(e.S / ref.S_double_truncated - 1)).toBeLessThan(1e-8);
  });
});

describe('structured against dense on the same points (issue 9: eigenvalues 1e-8 relative, S 1e-6)', () => {
  const n = 700;
  const s = diamond(n, 'agreement');
  let delta: DenseMatrix;
  let spectrumTop: Float64Array;
  let denseS: { double: number; keptDouble: number };
  let pairs: ReturnType<typeof topSkewPairs>;
  const cut = sqrtNCutoff(n);
  const progress: number[] = [];
  beforeAll(() => {
    const backend = getBackend();
    delta = denseDelta(s.points);
    const spectrum = pauliJordanSpectrum(delta, { backend });
    spectrumTop = spectrum.positive;
    const truncation = applyTruncation(spectrum.positive, n, { rule: 'sqrtN' });
    const state = sjState(delta, spectrum, truncation, backend);
    const elements = subregionElements(halfDiamond, s.points, 2);
    const d = entanglementEntropy(state, elements, { doubleTruncation: true, backend });
    denseS = { double: d.S, keptDouble: d.modesKept };
    pairs = topSkewPairs(pauliJordan2DFromPoints(s.points), { cut, onProgress: (p) => progress.push(p.converged) });
  });

  it('finds exactly the modes above √N/(4π) and their eigenvalues', () => {
    const above = spectrumTop.filter((v) => v > cut).length;
    expect(pairs.sigma.length).toBe(above);
    for (let i = 0; i < above; i++) expect(Math.abs(pairs.sigma[i] / spectrumTop[i] - 1)).toBeLessThan(1e-8);
    expect(progress.length).toBeGreaterThan(1);
  });

  it('returns orthonormal pairs with Δa = σb and Δb = −σa (server/engine/README.md §12)', () => {
    const k = pairs.sigma.length;
    let worst = 0;
    for (let i = 0; i < k; i += 7) {
      const da = denseApply(delta, pairs.a[i]);
      const db = denseApply(delta, pairs.b[i]);
      for (let r = 0; r < n; r++) worst = Math.max(worst, Math.abs(da[r] - pairs.sigma[i] * pairs.b[i][r]), Math.abs(db[r] + pairs.sigma[i] * pairs.a[i][r]));
    }
    expect(worst).toBeLessThan(1e-8 * pairs.sigma[0]);
    for (let i = 0; i < k; i += 5) {
      for (let j = 0; j < k; j += 3) {
        let aa = 0;
        let ab = 0;
        for (let r = 0; r < n; r++) {
          aa += pairs.a[i][r] * pairs.a[j][r];
          ab += pairs.a[i][r] * pairs.b[j][r];
        }
        expect(Math.abs(aa - (i === j ? 1 : 0))).toBeLessThan(1e-10);
        expect(Math.abs(ab)).toBeLessThan(1e-10);
      }
    }
  });

  it('factored state: tr W_c = Σσ and W − W̄ = iΔ_c on a vector (server/engine/README.md §5)', () => {
    const state = factoredState(pairs, cut);
    const sum = pairs.sigma.reduce((p, q) => p + q, 0);
    expect(Math.abs(factoredTrace(state) / sum - 1)).toBeLessThan(1e-12);
    // Im W_c w = ½ Δ_c w and Δ_c = Δ on the kept span: check on a kept vector
    const { imaginary } = applyWightman(state, pairs.a[3]);
    for (let r = 0; r < n; r++) expect(Math.abs(2 * imaginary[r] - pairs.sigma[3] * pairs.b[3][r])).toBeLessThan(1e-10 * pairs.sigma[0]);
  });

  it('double-truncated S equals the dense engine within 1e-6', () => {
    const state = factoredState(pairs, cut);
    const elements = subregionElements(halfDiamond, s.points, 2);
    const d = factoredEntropy(state, elements, { doubleTruncation: true });
    expect(d.modesKept).toBe(denseS.keptDouble);
    expect(Math.abs(d.S - denseS.double)).toBeLessThan(1e-6);
  });

  it('modes:K asks for the K largest', () => {
    const top = topSkewPairs(pauliJordan2DFromPoints(s.points), { count: 10 });
    for (let i = 0; i < 10; i++) expect(Math.abs(top.sigma[i] / spectrumTop[i] - 1)).toBeLessThan(1e-10);
  });
});

describe('large-N outside check: continuum spectrum of the 2D diamond (AAS 2012, server/engine/README.md §8)', () => {
  it('λ_1/N within 3 % and the top 20 within 5 % of N/(4x_k) at N = 4000', () => {
    const n = 4000;
    const s = diamond(n, 'continuum');
    const pairs = topSkewPairs(pauliJordan2DFromPoints(s.points), { cut: sqrtNCutoff(n) });
    const continuum = continuumDiamondSpectrum(n, 20);
    expect(Math.abs(pairs.sigma[0] / continuum[0] - 1)).toBeLessThan(0.03);
    for (let i = 0; i < 20; i++) expect(Math.abs(pairs.sigma[i] / continuum[i] - 1)).toBeLessThan(0.05);
    // about 2√N positive eigenvalues above √N/(4π) (server/engine/README.md §7; numpy: 90 at N = 2000)
    expect(Math.abs(pairs.sigma.length / (2 * Math.sqrt(n)) - 1)).toBeLessThan(0.1);
  });
});

describe('engine choice rule', () => {
  const sqrt = { rule: 'sqrtN' } as const;
  it('auto picks structured for large truncated 2D runs and dense otherwise', () => {
    expect(chooseEngine({ N: 50_000, dimension: 2, truncation: sqrt, denseMaxN: 3000 }).engine).toBe('structured');
    expect(chooseEngine({ N: 500, dimension: 2, truncation: sqrt, denseMaxN: 3000 }).engine).toBe('dense');
    expect(chooseEngine({ N: 2000, dimension: 2, truncation: { rule: 'none' }, denseMaxN: 3000 }).engine).toBe('dense');
    expect(chooseEngine({ N: 2000, dimension: 4, truncation: sqrt, denseMaxN: 3000 }).engine).toBe('dense');
    expect(chooseEngine({ N: 2000, dimension: 2, truncation: sqrt, denseMaxN: 3000, periodic: true }).engine).toBe('dense');
  });
  it('a forced engine is honoured or refused with the reason', () => {
    expect(chooseEngine({ N: 500, dimension: 2, truncation: sqrt, denseMaxN: 3000, requested: 'structured' }).engine).toBe('structured');
    expect(() => chooseEngine({ N: 500, dimension: 2, truncation: { rule: 'knee' }, denseMaxN: 3000, requested: 'structured' })).toThrow(/knee/);
    expect(() => chooseEngine({ N: 5000, dimension: 2, truncation: sqrt, denseMaxN: 3000, requested: 'dense' })).toThrow(/dense limit/);
    expect(() => chooseEngine({ N: 5000, dimension: 2, truncation: { rule: 'none' }, denseMaxN: 3000 })).toThrow(/all of them/);
  });
  it('max N per engine', () => {
    expect(maxElements('structured', 2, sqrt, 3000)).toBe(STRUCTURED_MAX_N_2D);
    expect(maxElements('structured', 2, { rule: 'none' }, 3000)).toBe(0);
    expect(maxElements('dense', 2, sqrt, 3000)).toBe(3000);
  });
});

describe('block products and the plain-JavaScript path', () => {
  it('applyBlock equals apply column by column (massive, common practice for fast operators)', () => {
    const s = diamond(400, 'block');
    const op = pauliJordan2DFromPoints(s.points, { mass: 1.3, density: s.density });
    const width = 5;
    const input = Float64Array.from({ length: 400 * width }, (_, i) => Math.cos(0.37 * i));
    const block = new Float64Array(400 * width);
    op.applyBlock(input, block, width);
    const one = new Float64Array(400);
    for (let lane = 0; lane < width; lane++) {
      op.apply(input.subarray(lane * 400, (lane + 1) * 400), one);
      for (let r = 0; r < 400; r++) expect(block[lane * 400 + r]).toBe(one[r]);
    }
  });

  it('the native block product equals its JavaScript twin on two threads, after a larger call (kept work arrays)', () => {
    // 20 000 elements × 16 lanes is above the size from which the two sweeps run on their own threads
    const large = diamond(20_000, 'native-block');
    const small = diamond(3000, 'native-block-small');
    for (const s of [large, small]) {
      const n = s.points.length / 2;
      const native = pauliJordan2DFromPoints(s.points, { mass: 0.7, density: s.density });
      const plain = pauliJordan2DFromPoints(s.points, { mass: 0.7, density: s.density, backend: null });
      const width = 16;
      const input = Float64Array.from({ length: n * width }, (_, i) => Math.sin(0.013 * i) + 0.1 * Math.cos(1.7 * i));
      const fromNative = new Float64Array(n * width);
      const fromPlain = new Float64Array(n * width);
      native.applyBlock(input, fromNative, width);
      plain.applyBlock(input, fromPlain, width);
      let worst = 0;
      let largest = 0;
      for (let i = 0; i < fromPlain.length; i++) {
        worst = Math.max(worst, Math.abs(fromNative[i] - fromPlain[i]));
        largest = Math.max(largest, Math.abs(fromPlain[i]));
      }
      expect(largest).toBeGreaterThan(1);
      expect(worst).toBeLessThan(1e-12 * largest);
    }
  });

  it('the JavaScript kernels (no BLAS) and a block of 1 give the same pairs as BLAS blocks', () => {
    const s = diamond(600, 'kernels');
    const cut = sqrtNCutoff(600);
    const blas = topSkewPairs(pauliJordan2DFromPoints(s.points), { cut });
    const plain = topSkewPairs(pauliJordan2DFromPoints(s.points), { cut, backend: null, blockSize: 1 });
    expect(plain.sigma.length).toBe(blas.sigma.length);
    for (let i = 0; i < blas.sigma.length; i++) expect(Math.abs(plain.sigma[i] / blas.sigma[i] - 1)).toBeLessThan(1e-10);
  });
});

describe('computeVacuum with either engine (issue 9: the engine is chosen by the rule and recorded)', () => {
  const sprinkling = { region: { kind: 'diamond2d' as const, properTime: 2 * Math.SQRT2 }, process: 'fixed' as const, count: 900, seed: 'engines', prng: 'arc4' as const };
  const request = { source: { kind: 'sprinkling' as const, sprinkling }, truncation: { rule: 'sqrtN' as const }, subregion: halfDiamond, doubleTruncation: true };
  it('structured and dense agree on the eigenvalues above the cut (1e-8) and S (1e-6); the checks hold', async () => {
    const dense = await computeVacuum({ ...request, engine: 'dense' });
    const structured = await computeVacuum({ ...request, engine: 'structured' });
    expect(dense.engine).toBe('dense');
    expect(structured.engine).toBe('structured');
    expect(structured.modesKept).toBe(dense.modesKept);
    expect(structured.cutoff).toBe(dense.cutoff);
    for (let i = 0; i < dense.modesKept; i++) expect(Math.abs(structured.eigenvalues[i] / dense.eigenvalues[i] - 1)).toBeLessThan(1e-8);
    expect(structured.relations).toBe(dense.relations);
    expect(Math.abs(structured.entropy!.S - dense.entropy!.S)).toBeLessThan(1e-6);
    expect(Math.abs(structured.diagnostics.trace / structured.diagnostics.positiveEigenvalueSum - 1)).toBeLessThan(1e-10);
    expect(structured.diagnostics.basisOrthonormalityError).toBeLessThan(1e-9);
    expect(structured.diagnostics.orthogonalityError).toBeLessThan(1e-9);
    expect(structured.diagnostics.commutatorError).toBeLessThan(1e-9);
  });
  it('modes:K keeps K modes with the dense engine’s cut between the K-th and the next', async () => {
    const modes = { ...request, truncation: { rule: 'modes' as const, count: 12 }, subregion: undefined, doubleTruncation: false };
    const dense = await computeVacuum({ ...modes, engine: 'dense' });
    const structured = await computeVacuum({ ...modes, engine: 'structured' });
    expect(structured.modesKept).toBe(12);
    expect(Math.abs(structured.cutoff / dense.cutoff - 1)).toBeLessThan(1e-9);
  });
  it('auto takes structured from N = 1000 with a cut, dense otherwise; a refused engine says why', async () => {
    const big = { ...request, source: { kind: 'sprinkling' as const, sprinkling: { ...sprinkling, count: 1200 } }, subregion: undefined, doubleTruncation: false };
    expect((await computeVacuum(big)).engine).toBe('structured');
    expect((await computeVacuum({ ...request, truncation: { rule: 'none' as const }, doubleTruncation: false })).engine).toBe('dense');
    await expect(computeVacuum({ ...request, truncation: { rule: 'knee' as const }, engine: 'structured' })).rejects.toThrow(EngineInputError);
    await expect(computeVacuum({ ...big, source: { kind: 'sprinkling' as const, sprinkling: { ...sprinkling, count: 9000 } }, engine: 'dense' })).rejects.toThrow(/dense limit/);
  });
});
