import { describe, expect, it } from 'vitest';
import { fourDimensionalLinkWeight, retardedGreen, retardedGreenOperator } from '../../server/engine/green';
import { pauliJordan } from '../../server/engine/pauliJordan';
import { causalMatrix, linkMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';
import { runPython } from '../support/python';

describe('2D massive retarded Green function', () => {
  it('averages to ½ J₀(mτ) over related pairs binned by proper time', () => {
    // Johnston 2008 (CQG 25 202001), check of server/engine/README.md §4: N = 1500, m = 2, diamond u, v ∈ [−1, 1];
    // numpy agreed within 0.005 absolute for τ from 0.1 to 2.3. J₀ from scipy.special.j0.
    // Statistical: single sprinklings scatter by several thousandths at large τ (the pairs of one
    // sprinkling are strongly correlated), so the bins pool three seeded sprinklings.
    const mass = 2;
    const width = 0.1;
    const bins = 23;
    const sum = new Float64Array(bins);
    const count = new Float64Array(bins);
    for (const seed of ['massive-2d-a', 'massive-2d-b', 'massive-2d-c']) {
      const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count: 1500, seed, prng: 'arc4' });
      const causal = causalMatrix(s.points, 2);
      const k = retardedGreen({ points: s.points, dimension: 2, causal, density: s.density, mass });
      const n = s.count;
      causal.forEach((y, x) => {
        const dt = s.points[2 * x] - s.points[2 * y];
        const dx = s.points[2 * x + 1] - s.points[2 * y + 1];
        const tau = Math.sqrt(dt * dt - dx * dx);
        const bin = Math.floor((tau - 0.05) / width);
        if (bin < 0 || bin >= bins) return;
        sum[bin] += k.data[x + y * n];
        count[bin]++;
      });
    }
    const centres = Array.from({ length: bins }, (_, b) => 0.1 + b * width);
    const j0 = runPython<number[]>(
      'import json, sys\nfrom scipy.special import j0\nprint(json.dumps([float(j0(v)) for v in json.load(sys.stdin)]))',
      centres.map((tau) => mass * tau),
    );
    for (let b = 0; b < bins; b++) {
      expect(count[b]).toBeGreaterThan(100);
      expect(Math.abs(sum[b] / count[b] - 0.5 * j0[b])).toBeLessThan(0.005);
    }
  });

  it('equals Φ (I + (m²/ρ) Φ)⁻¹ computed by numpy with a dense inverse', () => {
    // reference: numpy.linalg.inv on a small set; the engine itself only uses substitution
    const s = sprinkle({ region: { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 1 }, process: 'fixed', count: 60, seed: 'inverse-check', prng: 'alea' });
    const causal = causalMatrix(s.points, 2);
    const massless = retardedGreen({ points: s.points, dimension: 2, causal });
    const massive = retardedGreen({ points: s.points, dimension: 2, causal, density: s.density, mass: 3 });
    const expected = runPython<number[][]>(
      `import json, sys, numpy as np
d = json.load(sys.stdin); n = d['n']
phi = np.array(d['phi']).reshape((n, n), order='F')
k = phi @ np.linalg.inv(np.eye(n) + d['c'] * phi)
print(json.dumps(k.tolist()))`,
      { n: 60, phi: Array.from(massless.data), c: 9 / s.density },
    );
    for (let i = 0; i < 60; i++) for (let j = 0; j < 60; j++) expect(massive.data[i + j * 60]).toBeCloseTo(expected[i][j], 12);
  });
});

describe('4D massless retarded Green function', () => {
  it('integrates to T²/8 on the axis, approaching from below as T grows', () => {
    // derived from G_R = θ(Δt) δ(τ²)/(2π), server/engine/README.md §4: (1/ρ) Σ_y K[x][y] → T²/8 for x on the axis at
    // height T above the bottom tip; numpy at N = 6000 (tips t = ±1) gave ratios 0.63, 0.77, 0.88, 0.92
    // at T ≈ 0.75, 1.05, 1.35, 1.65. K = (√ρ/(2π√6)) Lᵀ, so Σ_y K[x][y] = weight × (links below x).
    const s = sprinkle({ region: { kind: 'diamond4d', properTime: 2 }, process: 'fixed', count: 6000, seed: 'four-d', prng: 'arc4' });
    const links = linkMatrix(causalMatrix(s.points, 4));
    const weight = fourDimensionalLinkWeight(s.density);
    const linksBelow = new Float64Array(s.count);
    links.forEach((_, j) => linksBelow[j]++);
    const centres = [0.75, 1.05, 1.35, 1.65];
    const ratios = centres.map((centre) => {
      let total = 0;
      let elements = 0;
      for (let i = 0; i < s.count; i++) {
        const p = s.points.subarray(4 * i, 4 * i + 4);
        const height = p[0] + 1;
        if (Math.hypot(p[1], p[2], p[3]) < 0.25 && Math.abs(height - centre) < 0.15) {
          total += (weight * linksBelow[i]) / s.density / ((height * height) / 8);
          elements++;
        }
      }
      expect(elements).toBeGreaterThan(5);
      return total / elements;
    });
    for (let b = 1; b < ratios.length; b++) expect(ratios[b]).toBeGreaterThan(ratios[b - 1] - 0.03);
    expect(ratios[3]).toBeGreaterThan(0.82);
    expect(ratios[3]).toBeLessThan(1.02);
    expect(ratios[0]).toBeLessThan(ratios[3]);
  });
});

describe('massless K kept as a weighted relation', () => {
  it('gives the same Δ = K − Kᵀ as the dense K, in 2D and 4D, and the dense K for a massive field', () => {
    // Johnston 2008/2009: 2D K = ½Cᵀ, 4D K = (√ρ/(2π√6)) Lᵀ; Δ built pair by pair must equal the
    // transposition of the dense matrix entry for entry
    for (const dimension of [2, 4] as const) {
      const region = dimension === 2 ? { kind: 'diamond2d' as const, properTime: 2 } : { kind: 'diamond4d' as const, properTime: 2 };
      const s = sprinkle({ region, process: 'fixed', count: 120, seed: `relation-${dimension}`, prng: 'arc4' });
      const input = { points: s.points, dimension, causal: causalMatrix(s.points, dimension), density: s.density };
      const operator = retardedGreenOperator(input);
      expect('relation' in operator).toBe(true);
      expect(Array.from(pauliJordan(operator).data)).toEqual(Array.from(pauliJordan(retardedGreen(input)).data));
    }
    const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 60, seed: 'relation-massive', prng: 'arc4' });
    const massive = { points: s.points, dimension: 2 as const, causal: causalMatrix(s.points, 2), density: s.density, mass: 1 };
    expect(Array.from((retardedGreenOperator(massive) as { data: Float64Array }).data)).toEqual(Array.from(retardedGreen(massive).data));
    expect(() => retardedGreenOperator({ ...massive, mass: -1 })).toThrow(/mass must be a finite number ≥ 0/);
  });
});
