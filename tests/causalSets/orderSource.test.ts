import { describe, expect, it } from 'vitest';
import { parseRelationList } from '../../server/causalSets/parse';
import { computeVacuum, DENSE_SIZE_LIMIT, EngineInputError, validateVacuumRequest, type VacuumRequest } from '../../server/engine/index';
import { causalMatrix, linkMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';
import { runPython } from '../support/python';

/**
 * The engine's `order` source: a causal set known only by its (closed) relation, as a relation list
 * upload gives it. Checked against the same set given by coordinates, under a random relabelling, and
 * against numpy on the definitions of server/engine/README.md §4–§5.
 */

function shuffled(n: number, seed: number): number[] {
  let state = seed;
  const next = () => ((state = (Math.imul(state, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const labels = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(next() * (i + 1));
    [labels[i], labels[j]] = [labels[j], labels[i]];
  }
  return labels;
}

/** The links of a sprinkling as a relation list text, with element i renamed to label[i]. */
function relabelledLinks(points: Float64Array, dimension: 2 | 4, label: number[]): string {
  const rows: string[] = [];
  linkMatrix(causalMatrix(points, dimension)).forEach((i, j) => rows.push(`${label[i]},${label[j]}`));
  return rows.join('\n');
}

/**
 * server/engine/README.md §6: through ΔᵀΔ a large eigenvalue is exact to a few ε relatively, while the
 * near-zero ones come out near √ε λ_max whatever the labelling; so large ones are compared relatively
 * and every one absolutely to 1e-7 of the largest.
 */
function expectSameSpectrum(actual: ArrayLike<number>, expected: ArrayLike<number>): void {
  expect(actual.length).toBe(expected.length);
  const top = Math.max(...Array.from(expected));
  for (let k = 0; k < expected.length; k++) {
    const error = Math.abs(actual[k] - expected[k]);
    expect(error).toBeLessThanOrEqual(1e-7 * top);
    if (expected[k] > 1e-2 * top) expect(error / expected[k]).toBeLessThan(1e-9);
  }
}

const limit = { maxElements: 3000, reason: 'test' };

describe('vacuum on a causal set given by its relation', () => {
  for (const [name, region, mass] of [
    ['2D massless', { kind: 'diamond2d', properTime: 2 }, 0],
    ['2D massive', { kind: 'diamond2d', properTime: 2 }, 2],
    ['4D massless', { kind: 'diamond4d', properTime: 2 }, 0],
  ] as const) {
    it(`${name}: the relabelled relation gives the spectrum and entropy of the coordinates`, async () => {
      const s = sprinkle({ region, process: 'fixed', count: 220, seed: `order-${name}`, prng: 'arc4' });
      const label = shuffled(s.count, 7);
      const closed = parseRelationList(relabelledLinks(s.points, s.dimension, label), { count: s.count, limit }).causal;
      const subregionOld = [3, 10, 11, 40, 41, 42, 77, 100, 101, 150, 151, 152, 199];
      const fromPoints = await computeVacuum({
        source: { kind: 'points', points: s.points, dimension: s.dimension, density: s.density },
        mass,
        truncation: { rule: 'none' },
        subregion: { kind: 'elements', indices: subregionOld },
      });
      const fromOrder = await computeVacuum({
        source: { kind: 'order', causal: closed.words, count: s.count, dimension: s.dimension, density: s.density },
        mass,
        truncation: { rule: 'none' },
        subregion: { kind: 'elements', indices: subregionOld.map((i) => label[i]) },
      });
      expect(fromOrder.N).toBe(s.count);
      expect(fromOrder.relations).toBe(fromPoints.relations);
      expect(fromOrder.links).toBe(fromPoints.links);
      expect(fromOrder.points.length).toBe(0);
      // the spectrum does not depend on the labels; both go through the same solver
      expectSameSpectrum(fromOrder.eigenvalues, fromPoints.eigenvalues);
      expect(Math.abs(fromOrder.entropy!.S - fromPoints.entropy!.S)).toBeLessThan(1e-7 * Math.abs(fromPoints.entropy!.S));
    });
  }

  it('agrees with numpy: K = ½Cᵀ(I + (m²/2ρ)Cᵀ)⁻¹ built from the relation, eigenvalues of iΔ', async () => {
    // server/engine/README.md §4 (Johnston 2008): 2D massive K_m = ½Cᵀ (I + (m²/2ρ) Cᵀ)⁻¹; §5: Δ = K − Kᵀ
    const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 150, seed: 'order-numpy', prng: 'alea' });
    const label = shuffled(s.count, 99);
    const closed = parseRelationList(relabelledLinks(s.points, 2, label), { count: s.count, limit }).causal;
    const pairs: [number, number][] = [];
    closed.forEach((i, j) => pairs.push([i, j]));
    const mass = 1.5;
    const ours = await computeVacuum({ source: { kind: 'order', causal: closed.words, count: s.count, dimension: 2, density: s.density }, mass });
    const reference = runPython<number[]>(
      `import json,sys,numpy as np
d=json.load(sys.stdin); n=d['n']; C=np.zeros((n,n))
for i,j in d['pairs']: C[i,j]=1.0
phi=0.5*C.T
K=np.linalg.solve(np.eye(n)+(d['m']**2/d['rho'])*phi, phi)
D=K-K.T
ev=np.linalg.eigvalsh(1j*D)
print(json.dumps(sorted([float(v) for v in ev if v>1e-6*max(ev)], reverse=True)))`,
      { n: s.count, pairs, m: mass, rho: s.density },
    );
    // numpy's kernel modes come out as ±1e-16 in either sign, ours (through ΔᵀΔ) near 1e-8 λ_max, so
    // both lists are compared above 1e-6 λ_max, where genuine modes of these sets lie (server/engine/README.md §6);
    // ours holds ⌊N/2⌋ values in all
    expect(ours.eigenvalues.length).toBe(Math.floor(s.count / 2));
    expect(ours.eigenvalues.filter((v) => v > 1e-6 * ours.eigenvalues[0]).length).toBe(reference.length);
    const top = reference[0];
    reference.forEach((expected, k) => expect(Math.abs(ours.eigenvalues[k] - expected)).toBeLessThan(1e-8 * expected + 1e-8 * top));
  });

  it('refuses what an order alone cannot give: a diamond subregion, a density-free 4D or massive field, a bad relation', () => {
    const closed = parseRelationList('0,1\n1,2\n', { count: 4, limit }).causal;
    const base: VacuumRequest = { source: { kind: 'order', causal: closed.words, count: 4, dimension: 2 } };
    expect(() => validateVacuumRequest(base)).not.toThrow();
    const fails = (request: VacuumRequest, message: RegExp) => {
      expect(() => validateVacuumRequest(request)).toThrow(EngineInputError);
      expect(() => validateVacuumRequest(request)).toThrow(message);
    };
    fails({ ...base, subregion: { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 1, x: 0 } } }, /list of elements/);
    fails({ ...base, mass: 1 }, /a massive field needs a density/);
    fails({ source: { kind: 'order', causal: closed.words, count: 4, dimension: 4 } }, /4D Green function needs a density/);
    fails({ source: { kind: 'order', causal: closed.words.subarray(1), count: 4, dimension: 2 } }, /has 4 words, got 3/);
    const reflexive = Uint32Array.from(closed.words);
    reflexive[2] |= 1 << 2;
    fails({ source: { kind: 'order', causal: reflexive, count: 4, dimension: 2 } }, /element 2 precedes itself/);
    const tooMany = DENSE_SIZE_LIMIT.maxN + 1;
    fails({ source: { kind: 'order', causal: new Uint32Array(tooMany * ((tooMany + 31) >>> 5)), count: tooMany, dimension: 2 } }, /exceeds the dense limit/);
  });

  it('refuses subregion labels that do not exist', async () => {
    const closed = parseRelationList('0,1\n1,2\n0,3\n', { count: 4, limit }).causal;
    await expect(
      computeVacuum({ source: { kind: 'order', causal: closed.words, count: 4, dimension: 2 }, subregion: { kind: 'elements', indices: [0, 9] } }),
    ).rejects.toThrow(/subregion element 9 does not exist: the causal set has 4 elements/);
  });
});
