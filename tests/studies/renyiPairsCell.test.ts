import { describe, expect, it } from 'vitest';
import { computeVacuum } from '../../server/engine/index';
import { computeStudyCell } from '../../server/studies/cell';
import { resolveSubregions } from '../../server/studies/plan';
import { runPython } from '../support/python';

/**
 * One cell of a pair study with Rényi orders on a fixed sprinkling of N = 240 in the 2D diamond of
 * proper time 2, checked against things outside the cell's own path: numpy decides which elements lie
 * in each sub-diamond (|t − t_c| + |x − x_c| < ℓ/2, the 2D diamond as the trade writes it), a run on the
 * same sprinkling through the engine's run pipeline gives S_A, S_B and S_{A∪B} on those element lists,
 * numpy evaluates the Rényi formula S_α = Σ_{μ>1} ln(μ^α − (μ−1)^α)/(α − 1) (S_∞ = Σ ln μ) on the run's μ,
 * and the restricted cut of double truncation is √n/(4π) with each part's own n (Sorkin–Yazdi 2018).
 */
const region = { kind: 'diamond2d', properTime: 2 } as const;
const sprinkling = { region, count: 240, seed: 'pair-cell' };
const orders = [0.5, 2, 'inf'] as const;
const rules = [
  { truncation: { rule: 'none' as const }, doubleTruncation: false },
  { truncation: { rule: 'sqrtN' as const }, doubleTruncation: true },
];

const membership = `
import json, sys
import numpy as np
data = json.load(sys.stdin)
p = np.array(data["points"]).reshape(-1, 2)
out = []
for d in data["diamonds"]:
    tc = (d["past"]["t"] + d["future"]["t"]) / 2
    xc = (d["past"]["x"] + d["future"]["x"]) / 2
    h = (d["future"]["t"] - d["past"]["t"]) / 2
    out.append(np.nonzero(np.abs(p[:, 0] - tc) + np.abs(p[:, 1] - xc) < h)[0].tolist())
print(json.dumps(out))
`;

const renyiScript = `
import json, sys
import numpy as np
data = json.load(sys.stdin)
mu = np.array(data["mu"])
mu = mu[mu > 1 + 1e-15]
out = {}
for a in data["orders"]:
    if a == "inf":
        out["inf"] = float(np.sum(np.log(mu)))
    else:
        out[str(a)] = float(np.sum(np.log(mu ** a - (mu - 1) ** a)) / (a - 1))
print(json.dumps(out))
`;

describe('a pair cell with Rényi orders', () => {
  it('gives S_A, S_B, S_AB and I = S_A + S_B − S_AB as runs on the numpy element lists do, with each part its own restricted cut', async () => {
    const subregions = resolveSubregions({ region, subregions: { kind: 'pairs', sizes: [0.3], separations: [0.05, 0.2] } });
    const cell = await computeStudyCell({ sprinkling, mass: 0, subregions, rules, renyi: [...orders] });
    expect(cell.entropies).toHaveLength(4);

    const run = await computeVacuum({ source: { kind: 'sprinkling', sprinkling }, truncation: { rule: 'none' } });
    for (const subregion of subregions) {
      const [a, b] = runPython<number[][]>(membership, { points: Array.from(run.points), diamonds: [subregion.pair!.a, subregion.pair!.b] });
      const union = [...a!, ...b!].sort((p, q) => p - q);
      for (const rule of rules) {
        const key = rule.doubleTruncation ? 'sqrtN+double' : 'none';
        const row = cell.entropies.find((e) => e.subregion === subregion.key && e.rule === key)!;
        expect(row.pair).toMatchObject({ size: 0.3, separation: subregion.pair!.separation, nA: a!.length, nB: b!.length });
        expect(row.n).toBe(union.length);
        const entropyOn = async (indices: number[]) =>
          (await computeVacuum({ source: { kind: 'sprinkling', sprinkling }, ...rule, subregion: { kind: 'elements', indices }, renyi: [...orders] })).entropy!;
        const [sa, sb, sab] = [await entropyOn(a!), await entropyOn(b!), await entropyOn(union)];
        expect(row.pair!.SA).toBeCloseTo(sa.S, 9);
        expect(row.pair!.SB).toBeCloseTo(sb.S, 9);
        expect(row.pair!.SAB).toBeCloseTo(sab.S, 9);
        expect(row.S).toBe(row.pair!.SAB);
        expect(row.pair!.I).toBeCloseTo(sa.S + sb.S - sab.S, 9);
        if (rule.doubleTruncation) {
          // the union's own restricted cut, √n/(4π) with n = |A∪B|, not that of A or B
          expect(row.cutoff).toBeCloseTo(Math.sqrt(union.length) / (4 * Math.PI), 12);
          expect(sa.cutoff).toBeCloseTo(Math.sqrt(a!.length) / (4 * Math.PI), 12);
        } else {
          // subadditivity S_AB ≤ S_A + S_B of the von Neumann entropy (common practice) for the untruncated state
          expect(row.pair!.I).toBeGreaterThan(-1e-9);
        }
        // the Rényi entropies of A∪B and the Rényi mutual information, the formula evaluated by numpy on the run's μ
        const expected = (mu: Float64Array) => runPython<Record<string, number>>(renyiScript, { mu: Array.from(mu), orders });
        const [ra, rb, rab] = [expected(sa.generalizedEigenvalues), expected(sb.generalizedEigenvalues), expected(sab.generalizedEigenvalues)];
        for (const k of ['0.5', '2', 'inf']) {
          expect(row.renyi![k]).toBeCloseTo(rab[k]!, 8);
          expect(row.pair!.renyiI![k]).toBeCloseTo(ra[k]! + rb[k]! - rab[k]!, 8);
        }
        // S_α decreases with α (common practice): S_0.5 ≥ S ≥ S_2 ≥ S_∞
        expect(row.renyi!['0.5']).toBeGreaterThanOrEqual(row.S - 1e-12);
        expect(row.S).toBeGreaterThanOrEqual(row.renyi!['2']! - 1e-12);
        expect(row.renyi!['2']).toBeGreaterThanOrEqual(row.renyi!.inf! - 1e-12);
      }
    }
  }, 120_000);

  it('reports S_α beside S for a single subregion and fails a pair whose parts are causally related', async () => {
    const single = resolveSubregions({ region, subregions: { kind: 'concentric', fractions: [0.5] } });
    const cell = await computeStudyCell({ sprinkling, mass: 0, subregions: single, rules: [rules[0]!], renyi: [2] });
    expect(Object.keys(cell.entropies[0]!.renyi!)).toEqual(['2']);
    expect(cell.entropies[0]!.pair).toBeUndefined();

    // B sits on A's future tip: every element of A precedes every element of B
    const [pair] = resolveSubregions({ region, subregions: { kind: 'pairs', sizes: [0.3], separations: [0.05] } });
    const related = { ...pair!, pair: { ...pair!.pair!, b: { past: { t: 0.3, x: -0.35 }, future: { t: 0.6, x: -0.35 } } } };
    await expect(computeStudyCell({ sprinkling, mass: 0, subregions: [related], rules: [rules[0]!] })).rejects.toThrow(/causally related/);
  }, 60_000);
});
