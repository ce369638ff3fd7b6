import { beforeAll, describe, expect, it } from 'vitest';
import { studyRuleKey, studyRuleLabel, studyRuleSchema } from '@shared/studies';
import { entropyRuleLabel, parseRestrictedCut, ruleCautions } from '@shared/vacuum';
import { computeVacuum, EngineInputError, validateVacuumRequest } from '../../server/engine/index';
import { diamond300Points, diamond300Reference } from '../support/diamond300';
import { runPython } from '../support/python';

// The second cut of double truncation as a setting of its own (Sorkin–Yazdi 2018, CQG 35 074004: after
// restricting the truncated state to a subregion of n elements, drop the restricted modes with
// |λ| ≤ √n/(4π)). Outside references: fixtures/diamond300.ref.json (numpy 1.24.2 + LAPACK on the
// points of fixtures/diamond300.csv, see fixtures/README.md) and an independent numpy computation below.

const points = diamond300Points();
const ref = diamond300Reference<{
  N: number;
  n_sub: number;
  S_double_truncated: number;
}>();
const subregion = { kind: 'diamond' as const, past: { t: -Math.SQRT1_2, x: 0 }, future: { t: Math.SQRT1_2, x: 0 } };
const source = { kind: 'points' as const, points, dimension: 2 as const, region: { kind: 'diamond2d' as const, properTime: 2 * Math.SQRT2 } };

/**
 * The SSEE by the complex generalised eigenproblem, all in numpy: K = ½Cᵀ (Johnston 2008), iΔ Hermitian,
 * W its positive part cut at `state_cut`, restricted to O, the restricted iΔ's modes with |λ| ≤ `restricted_cut`
 * dropped, then W_O v = μ iΔ_O v on the kept modes and S = Σ μ ln|μ| (Sorkin 2012; Saravani–Sorkin–Yazdi 2014).
 */
const numpyEntropy = `
import json, sys
import numpy as np
d = json.load(sys.stdin)
p = np.array(d['points']).reshape(-1, 2)
t, x = p[:, 0], p[:, 1]
C = ((t[None, :] - t[:, None]) > np.abs(x[None, :] - x[:, None])).astype(float)  # C[i,j] = 1 iff i precedes j
K = 0.5 * C.T
H = 1j * (K - K.T)
lam, V = np.linalg.eigh(H)
out = []
for case in d['cases']:
    keep = lam > case['state_cut']
    W = (V[:, keep] * lam[keep]) @ V[:, keep].conj().T
    both = np.abs(lam) > case['state_cut']  # iΔ_c keeps the negative partners of the kept modes too
    Hc = (V[:, both] * lam[both]) @ V[:, both].conj().T if case['state_cut'] > 0 else H
    O = np.array(d['elements'])
    WO = W[np.ix_(O, O)]
    HO = Hc[np.ix_(O, O)]
    l, U = np.linalg.eigh(HO)
    cut = case['restricted_cut'] if case['restricted_cut'] is not None else 1e-6 * np.max(np.abs(l))
    k = np.abs(l) > cut
    Uk = U[:, k]
    mu = np.linalg.eigvals(np.diag(1.0 / l[k]) @ (Uk.conj().T @ WO @ Uk)).real
    mu = mu[np.abs(mu) > 1e-14]
    out.append({'S': float(np.sum(mu * np.log(np.abs(mu)))), 'kept': int(k.sum())})
print(json.dumps(out))
`;

describe('restricted cut of double truncation', () => {
  const sqrtn = Math.sqrt(ref.n_sub) / (4 * Math.PI);
  const sqrtN = Math.sqrt(ref.N) / (4 * Math.PI);
  let reference: { S: number; kept: number }[];
  let elements: number[];

  beforeAll(async () => {
    const probe = await computeVacuum({ source, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true });
    elements = Array.from(probe.entropy!.elements);
    reference = runPython(numpyEntropy, {
      points: Array.from(points),
      elements,
      cases: [
        { state_cut: sqrtN, restricted_cut: 2 * sqrtn },
        { state_cut: 0, restricted_cut: sqrtn },
      ],
    });
  }, 120_000);

  it('defaults to √n/(4π): the stored numpy reference value of the diamond300 fixture', async () => {
    const r = await computeVacuum({ source, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true });
    expect(r.entropy!.restrictedCut).toEqual({ rule: 'sqrtN' });
    expect(r.entropy!.cutoff).toBeCloseTo(sqrtn, 14);
    expect(Math.abs(r.entropy!.S / ref.S_double_truncated - 1)).toBeLessThan(1e-8);
    // a fixed λ equal to √n/(4π) is the same cut, so the same S
    const fixed = await computeVacuum({ source, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: sqrtn } });
    expect(fixed.entropy!.S).toBeCloseTo(r.entropy!.S, 10);
  });

  it('applies a fixed restricted λ as numpy does', async () => {
    const r = await computeVacuum({ source, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 2 * sqrtn } });
    expect(r.entropy!.cutoff).toBe(2 * sqrtn);
    expect(r.entropy!.restrictedCut).toEqual({ rule: 'lambda', cut: 2 * sqrtn });
    expect(r.entropy!.modesKept).toBe(reference[0].kept);
    expect(Math.abs(r.entropy!.S / reference[0].S - 1)).toBeLessThan(1e-7);
    // a harder cut keeps fewer modes than the default and lowers S (fewer modes carry entropy)
    const standard = await computeVacuum({ source, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true });
    expect(r.entropy!.modesKept).toBeLessThan(standard.entropy!.modesKept);
  });

  it('with an untruncated state is the restricted cut only, named so, and matches numpy', async () => {
    const r = await computeVacuum({ source, truncation: { rule: 'none' }, subregion, doubleTruncation: true });
    expect(r.entropy!.modesKept).toBe(reference[1].kept);
    expect(Math.abs(r.entropy!.S / reference[1].S - 1)).toBeLessThan(1e-7);
    expect(entropyRuleLabel({ truncation: { rule: 'none' }, doubleTruncation: true })).toMatch(/^restricted cut only/);
    expect(entropyRuleLabel({ truncation: { rule: 'sqrtN' }, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 0.5 } })).toBe(
      'double-truncated (state √N/(4π), restricted λ = 0.5)',
    );
    expect(entropyRuleLabel({ truncation: { rule: 'none' }, doubleTruncation: false })).toBe('untruncated');
  });

  it('is refused without double truncation, or with a bad λ, before any work', () => {
    const base = { source, truncation: { rule: 'sqrtN' as const }, subregion };
    expect(() => validateVacuumRequest({ ...base, restrictedCut: { rule: 'sqrtN' } })).toThrow(EngineInputError);
    expect(() => validateVacuumRequest({ ...base, restrictedCut: { rule: 'sqrtN' } })).toThrow(/restrictedCut: a restricted cut applies only with double truncation/);
    expect(() => validateVacuumRequest({ ...base, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: -1 } as never })).toThrow(/invalid restrictedCut/);
    expect(() => parseRestrictedCut('lambda:')).toThrow(/restricted cut must be one of/);
    expect(parseRestrictedCut('none')).toBeNull();
    expect(parseRestrictedCut('lambda:0.25')).toEqual({ rule: 'lambda', cut: 0.25 });
  });

  it('is part of a study rule: its key, label and the refusal without double truncation', () => {
    expect(studyRuleKey({ truncation: { rule: 'sqrtN' }, doubleTruncation: true })).toBe('sqrtN+double');
    expect(studyRuleKey({ truncation: { rule: 'sqrtN' }, doubleTruncation: true, restrictedCut: { rule: 'sqrtN' } })).toBe('sqrtN+double');
    expect(studyRuleKey({ truncation: { rule: 'knee' }, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 0.2 } })).toBe('knee+double:lambda:0.2');
    expect(studyRuleLabel({ truncation: { rule: 'knee' }, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 0.2 } })).toBe(
      'double-truncated (state knee, restricted λ = 0.2)',
    );
    const refused = studyRuleSchema.safeParse({ truncation: { rule: 'sqrtN' }, restrictedCut: { rule: 'sqrtN' } });
    expect(refused.success).toBe(false);
    expect(refused.error!.issues[0].path).toEqual(['restrictedCut']);
  });
});

describe('4D results that use the 2D cut √N/(4π) carry a caution', () => {
  it('states the share of modes √N/(4π) keeps on a 500-element 4D diamond (about half, measured here)', async () => {
    const sprinkling = { region: { kind: 'diamond4d' as const, properTime: 2 }, count: 500, seed: 'caution-4d' };
    const r = await computeVacuum({ source: { kind: 'sprinkling', sprinkling }, truncation: { rule: 'sqrtN' } });
    // the claim in the caution's words: about half of the positive modes (measured 0.50–0.54 on three seeds)
    const share = r.modesKept / r.eigenvalues.length;
    expect(share).toBeGreaterThan(0.35);
    expect(share).toBeLessThan(0.65);
    expect(r.cautions).toHaveLength(1);
    expect(r.cautions[0]).toMatch(/√N\/\(4π\) is a rule from 2D work/);
    expect(r.cautions[0]).toContain(`Here it keeps ${r.modesKept} of ${r.eigenvalues.length} positive modes.`);
    const knee = await computeVacuum({ source: { kind: 'sprinkling', sprinkling }, truncation: { rule: 'knee' } });
    expect(knee.cautions).toEqual([]);
  }, 60_000);

  it('names the restricted √n/(4π) in 4D too, and nothing in 2D', () => {
    expect(ruleCautions(4, { truncation: { rule: 'knee' }, doubleTruncation: true })).toEqual([expect.stringMatching(/restricted cut √n\/\(4π\)/)]);
    expect(ruleCautions(4, { truncation: { rule: 'knee' }, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 1 } })).toEqual([]);
    expect(ruleCautions(2, { truncation: { rule: 'sqrtN' }, doubleTruncation: true })).toEqual([]);
  });
});
