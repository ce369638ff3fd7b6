import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { computeVacuum } from '../../server/engine';
import { singleCutNote } from '../../src/features/runs/components/RunResultTables';
import { runPython } from '../support/python';

/**
 * Entropy with only the whole-region cut (no second cut in the subregion). The restricted W_c and iΔ_c
 * have rank at most 2k for k kept positive modes, so when the subregion holds more than 2k elements the
 * restricted state is pure and S = 0 in exact arithmetic. Reference: numpy (complex Hermitian eigh of
 * iΔ, the definitions of server/engine/README.md §5 and §9) on the same points; the run page explains the zero.
 */
const points = readFileSync(new URL('../../fixtures/diamond300.csv', import.meta.url), 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((line) => line.split(',').map(Number));
const subregion = { kind: 'diamond' as const, past: { t: -Math.SQRT1_2, x: 0 }, future: { t: Math.SQRT1_2, x: 0 } };

const numpyScript = String.raw`
import json, sys
import numpy as np
pts = np.array(json.load(sys.stdin)); t, x = pts[:, 0], pts[:, 1]; N = len(t)
C = ((t[None, :] - t[:, None]) > np.abs(x[None, :] - x[:, None])).astype(float)
D = 0.5 * C.T - 0.5 * C
ev, V = np.linalg.eigh(1j * D)
cut = np.sqrt(N) / (4 * np.pi)
kept = V[:, np.abs(ev) > cut]; P = kept @ kept.conj().T
pos = ev > cut
Wc = (V[:, pos] * ev[pos]) @ V[:, pos].conj().T
iDc = P @ (1j * D) @ P
sub = np.where(np.abs(t) + np.abs(x) <= 1 / np.sqrt(2))[0]
Wo = Wc[np.ix_(sub, sub)]; Ao = iDc[np.ix_(sub, sub)]
e, U = np.linalg.eigh(Ao)
keep = np.abs(e) > 1e-6 * np.abs(e).max()
U = U[:, keep]
mu = np.linalg.eigvals(np.diag(1 / e[keep]) @ U.conj().T @ Wo @ U).real
mu = mu[(np.abs(mu) > 1e-12) & (np.abs(mu - 1) > 1e-12)]
print(json.dumps({"S": float(np.sum(mu * np.log(np.abs(mu)))), "n": int(len(sub)), "k": int(pos.sum())}))
`;

describe('entropy with only the whole-region cut', () => {
  it('vanishes when the subregion holds more than 2k elements, as numpy finds', async () => {
    const reference = runPython<{ S: number; n: number; k: number }>(numpyScript, points);
    expect(reference.n).toBeGreaterThan(2 * reference.k);
    expect(Math.abs(reference.S)).toBeLessThan(1e-9);

    const result = await computeVacuum({
      source: { kind: 'points', points: points.flat(), dimension: 2, density: points.length / 4 },
      truncation: { rule: 'sqrtN' },
      subregion,
    });
    expect(result.modesKept).toBe(reference.k);
    expect(result.entropy?.n).toBe(reference.n);
    // rounding only (measured 2e-11 to 4e-11; numpy's is checked below 1e-9 above): the untruncated S
    // of this subregion is about 20 (fixtures/diamond300.ref.json)
    expect(Math.abs(result.entropy!.S)).toBeLessThan(1e-9);
    expect(singleCutNote(result.entropy!, result.modesKept, true, false)).toMatch(/2k = 64 modes, fewer than the n = 83 elements/);
    expect(singleCutNote(result.entropy!, result.modesKept, true, true)).toBeNull();
    expect(singleCutNote(result.entropy!, result.modesKept, false, false)).toBeNull();
  });
});
