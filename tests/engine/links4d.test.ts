import { describe, expect, it } from 'vitest';
import { retardedGreen } from '../../server/engine/green';
import type { DenseMatrix } from '../../server/engine/linalg/backend';
import { causalMatrix, linkMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sprinkle } from '../../server/engine/sprinkle';
import { links4D, PauliJordan4D } from '../../server/engine/structured/links4d';
import { topSkewPairs } from '../../server/engine/structured/lanczos';

const diamond4 = (count: number, seed: string) =>
  sprinkle({ region: { kind: 'diamond4d', properTime: 2 }, process: 'fixed', count, seed, prng: 'arc4' });

function denseApply(m: DenseMatrix, w: Float64Array, transpose = false): Float64Array {
  const n = m.rows;
  const out = new Float64Array(n);
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) {
    if (transpose) out[j] += m.data[i + j * n] * w[i];
    else out[i] += m.data[i + j * n] * w[j];
  }
  return out;
}

const maxAbs = (a: ArrayLike<number>) => Array.from(a).reduce((m, v) => Math.max(m, Math.abs(v)), 0);
const maxDiff = (a: ArrayLike<number>, b: ArrayLike<number>) => Array.from(a).reduce((m, v, i) => Math.max(m, Math.abs(v - b[i])), 0);

// The reference throughout is the dense engine (server/engine/order.ts linkMatrix from the bit-packed
// causal matrix, green.ts retardedGreen with its unit-triangular solve): the brute-force definitions of
// server/engine/README.md §1 and §4 (Johnston 2009, PRL 103 180401), common practice for checking a fast operator.
describe('4D links as sparse rows and Δ as a sparse product, against the dense 4D engine', () => {
  const s = diamond4(600, 'links-4d');
  const causal = causalMatrix(s.points, 4);
  const dense = linkMatrix(causal);
  const links = links4D(s.points);

  it('finds exactly the links of the dense link matrix', () => {
    const found: string[] = [];
    for (let q = 0; q < links.size; q++) {
      for (let k = links.past.start[q]; k < links.past.start[q + 1]; k++) found.push(`${links.byTime[links.past.index[k]]}<${links.byTime[q]}`);
    }
    const expected: string[] = [];
    dense.forEach((i, j) => expected.push(`${i}<${j}`));
    expect(found.sort()).toEqual(expected.sort());
    expect(links.count).toBe(dense.count());
    // the future rows are the same links the other way round
    let futureCount = 0;
    for (let p = 0; p < links.size; p++) {
      for (let k = links.future.start[p]; k < links.future.start[p + 1]; k++) {
        futureCount++;
        expect(dense.has(links.byTime[p], links.byTime[links.future.index[k]])).toBe(true);
      }
    }
    expect(futureCount).toBe(links.count);
  });

  it('massless: K w, Kᵀ w and Δ w equal the dense products (integer w: every sum is exact before one scaling)', () => {
    const op = new PauliJordan4D(links, { density: s.density });
    const K = retardedGreen({ points: s.points, dimension: 4, causal, links: dense, density: s.density });
    const w = Float64Array.from({ length: s.count }, (_, i) => ((i * 7919) % 23) - 11);
    const kw = new Float64Array(s.count);
    op.applyRetarded(w, kw);
    const kTw = new Float64Array(s.count);
    op.applyAdvanced(w, kTw);
    const denseKw = denseApply(K, w);
    const denseKTw = denseApply(K, w, true);
    // integer sums are exact; the one product by √ρ/(2π√6) rounds once on each side
    expect(maxDiff(kw, denseKw)).toBeLessThanOrEqual(4 * Number.EPSILON * maxAbs(denseKw));
    expect(maxDiff(kTw, denseKTw)).toBeLessThanOrEqual(4 * Number.EPSILON * maxAbs(denseKTw));
    const out = new Float64Array(s.count);
    op.apply(w, out);
    const denseOut = denseApply(pauliJordan(K), w);
    expect(maxDiff(out, denseOut)).toBeLessThanOrEqual(8 * Number.EPSILON * maxAbs(denseOut));
  });

  it('massive: the sparse substitution in time order matches the dense solve to 1e-12', () => {
    const mass = 3;
    const op = new PauliJordan4D(links, { density: s.density, mass });
    const delta = pauliJordan(retardedGreen({ points: s.points, dimension: 4, causal, links: dense, density: s.density, mass }));
    const width = 3;
    const block = Float64Array.from({ length: s.count * width }, (_, i) => Math.sin(1.7 * i + 0.3));
    const out = new Float64Array(s.count * width);
    op.applyBlock(block, out, width);
    for (let lane = 0; lane < width; lane++) {
      const w = block.subarray(lane * s.count, (lane + 1) * s.count);
      const expected = denseApply(delta, w);
      expect(maxDiff(out.subarray(lane * s.count, (lane + 1) * s.count), expected)).toBeLessThanOrEqual(1e-12 * maxAbs(expected));
    }
    // the massive K differs from the massless one, so the check is not empty
    const massless = new Float64Array(s.count * width);
    new PauliJordan4D(links, { density: s.density }).applyBlock(block, massless, width);
    expect(maxDiff(out, massless)).toBeGreaterThan(1e-3 * maxAbs(massless));
  });

  it('the block skew Lanczos on the sparse 4D operator finds the top pairs of the dense spectrum', () => {
    const op = new PauliJordan4D(links, { density: s.density });
    const K = retardedGreen({ points: s.points, dimension: 4, causal, links: dense, density: s.density });
    const denseSpectrum = pauliJordanSpectrum(pauliJordan(K)).positive;
    const pairs = topSkewPairs(op, { count: 20 });
    for (let k = 0; k < 20; k++) expect(Math.abs(pairs.sigma[k] - denseSpectrum[k]) / denseSpectrum[k]).toBeLessThan(1e-8);
  });
});
