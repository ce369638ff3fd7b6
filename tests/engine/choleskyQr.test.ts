import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { getBackend } from '../../server/engine/linalg';
import type { LinearAlgebraBackend } from '../../server/engine/linalg/backend';
import { Basis } from '../../server/engine/structured/basis';
import { blockQr, cholesky } from '../../server/engine/structured/choleskyQr';
import { runPython } from '../support/python';

/** column-major n × width block with entries uniform in [−½, ½) from a fixed seed */
function randomBlock(n: number, width: number, seed: string): Float64Array {
  const random = seedrandom(seed);
  return Float64Array.from({ length: n * width }, () => random() - 0.5);
}

/** max |QᵀQ − I| of a column-major n × width Q */
function orthogonalityError(q: Float64Array, n: number, width: number): number {
  let worst = 0;
  for (let a = 0; a < width; a++) {
    for (let b = 0; b < width; b++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += q[a * n + i] * q[b * n + i];
      worst = Math.max(worst, Math.abs(s - (a === b ? 1 : 0)));
    }
  }
  return worst;
}

/** max |W − Q G| over the entries, for column-major Q (n × width) and G (width × width) */
function qrIdentityError(w: Float64Array, q: Float64Array, g: Float64Array, n: number, width: number): number {
  let worst = 0;
  for (let j = 0; j < width; j++) {
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < width; k++) s += q[k * n + i] * g[k + j * width];
      worst = Math.max(worst, Math.abs(w[j * n + i] - s));
    }
  }
  return worst;
}

function maxAbs(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]));
  return m;
}

/** numpy.linalg.qr of a column-major block, with the signs chosen so R has a positive diagonal (the unique such QR) */
function numpyQr(w: Float64Array, n: number, width: number): { q: number[]; r: number[] } {
  return runPython<{ q: number[]; r: number[] }>(
    `import json,sys,numpy as np
d=json.load(sys.stdin); n=d['n']; b=d['width']
W=np.array(d['w']).reshape(b,n).T
Q,R=np.linalg.qr(W)
s=np.sign(np.diag(R)); Q=Q*s; R=(R.T*s).T
print(json.dumps({'q':Q.T.ravel().tolist(),'r':R.T.ravel().tolist()}))`,
    { n, width, w: Array.from(w) },
  );
}

const backends: [string, LinearAlgebraBackend | null][] = [
  ['plain JavaScript Gram', null],
  [`the ${getBackend().name} backend's Gram`, getBackend()],
];

describe('Cholesky QR of a Lanczos block', () => {
  it('factors a 3 × 2 block worked by hand with Gram–Schmidt', () => {
    // worked example: a = (3, 4, 0), b = (4, 3, 0); q1 = a/5, b·q1 = 4.8, b − 4.8 q1 = (1.12, −0.84, 0) of length 1.4
    const w = Float64Array.from([3, 4, 0, 4, 3, 0]);
    const { g, invariant } = blockQr(new Basis(3, 4, null), w, 2, 1, seedrandom('unused'), null);
    expect(invariant).toBe(false);
    const expectedQ = [0.6, 0.8, 0, 0.8, -0.6, 0];
    const expectedG = [5, 0, 4.8, 1.4];
    for (let i = 0; i < 6; i++) expect(Math.abs(w[i] - expectedQ[i])).toBeLessThan(1e-15);
    for (let i = 0; i < 4; i++) expect(Math.abs(g[i] - expectedG[i])).toBeLessThan(1e-14);
  });

  for (const [label, backend] of backends) {
    it(`gives numpy's QR of a random 60 × 6 block (${label})`, () => {
      const n = 60;
      const width = 6;
      const original = randomBlock(n, width, 'cholesky-qr');
      const w = Float64Array.from(original);
      const { g, invariant } = blockQr(new Basis(n, 8, null), w, width, 1, seedrandom('unused'), backend);
      expect(invariant).toBe(false);
      // G is upper triangular with a positive diagonal, Q orthonormal, W = Q G
      for (let j = 0; j < width; j++) {
        expect(g[j + j * width]).toBeGreaterThan(0);
        for (let i = j + 1; i < width; i++) expect(g[i + j * width]).toBe(0);
      }
      expect(orthogonalityError(w, n, width)).toBeLessThan(1e-14);
      expect(qrIdentityError(original, w, g, n, width)).toBeLessThan(1e-14);
      // the QR with a positive diagonal is unique, so numpy (LAPACK Householder) must give the same factors
      const reference = numpyQr(original, n, width);
      expect(maxAbs(Array.from(w, (v, i) => v - reference.q[i]))).toBeLessThan(1e-13);
      expect(maxAbs(Array.from(g, (v, i) => v - reference.r[i]))).toBeLessThan(1e-13);
    });
  }

  it('restores orthogonality to rounding on a block of condition number 10⁶ (the second pass)', () => {
    // one Cholesky QR loses orthogonality like κ²·ε; the repeated one is back at rounding for κ up to
    // about ε^(-1/2) (Yamamoto, Nakatsukasa, Yanagisawa & Fukaya 2015, Electron. Trans. Numer. Anal. 44,
    // CholeskyQR2; recalled from memory). Built by numpy from singular values 1 … 10⁻⁶.
    const n = 80;
    const width = 5;
    const made = runPython<{ w: number[]; cond: number }>(
      `import json,sys,numpy as np
d=json.load(sys.stdin); rng=np.random.RandomState(7)
U,_=np.linalg.qr(rng.standard_normal((d['n'],d['width']))); V,_=np.linalg.qr(rng.standard_normal((d['width'],d['width'])))
W=U@np.diag(np.logspace(0,-6,d['width']))@V.T
print(json.dumps({'w':W.T.ravel().tolist(),'cond':float(np.linalg.cond(W))}))`,
      { n, width },
    );
    expect(made.cond).toBeGreaterThan(0.9e6);
    const original = Float64Array.from(made.w);
    const w = Float64Array.from(original);
    const { g, invariant } = blockQr(new Basis(n, 8, null), w, width, 1, seedrandom('unused'), null);
    expect(invariant).toBe(false);
    expect(orthogonalityError(w, n, width)).toBeLessThan(1e-14);
    expect(qrIdentityError(original, w, g, n, width)).toBeLessThan(1e-14);
  });

  it('replaces a zero column by a unit vector orthogonal to the others and to the basis, with a zero column in G', () => {
    const n = 40;
    const width = 3;
    const basis = new Basis(n, 8, null);
    const start = randomBlock(n, 4, 'basis');
    blockQr(basis, start, 4, 1, seedrandom('start'), null);
    basis.push(start, 4);
    // two columns orthogonal to the basis, and a zero one: the Krylov space is invariant in that direction
    const w = randomBlock(n, width, 'block');
    w.fill(0, 2 * n);
    basis.subtract(basis.project(w, width), w, width);
    const original = Float64Array.from(w);
    const { g, invariant } = blockQr(basis, w, width, 1, seedrandom('fresh'), null);
    expect(invariant).toBe(false);
    expect(orthogonalityError(w, n, width)).toBeLessThan(1e-14);
    expect(maxAbs(basis.project(w, width))).toBeLessThan(1e-14);
    expect(Array.from(g.subarray(2 * width))).toEqual([0, 0, 0]);
    expect(qrIdentityError(original, w, g, n, width)).toBeLessThan(1e-14);
  });

  it('says the block is invariant when every column is zero, and still returns fresh orthonormal directions', () => {
    const n = 30;
    const basis = new Basis(n, 8, null);
    const start = randomBlock(n, 3, 'basis');
    blockQr(basis, start, 3, 1, seedrandom('start'), null);
    basis.push(start, 3);
    const w = new Float64Array(n * 2);
    const { g, invariant } = blockQr(basis, w, 2, 1, seedrandom('fresh'), null);
    expect(invariant).toBe(true);
    expect(Array.from(g)).toEqual([0, 0, 0, 0]);
    expect(orthogonalityError(w, n, 2)).toBeLessThan(1e-14);
    expect(maxAbs(basis.project(w, 2))).toBeLessThan(1e-14);
  });
});

describe('Cholesky factor of the Gram matrix', () => {
  it('factors [[4, 2], [2, 5]] as RᵀR with R = [[2, 1], [0, 2]] exactly, and refuses a singular matrix', () => {
    // worked example: 2·2 = 4, 2·1 = 2, 1 + 2·2 = 5
    expect(Array.from(cholesky(Float64Array.from([4, 2, 2, 5]), 2, 0)!)).toEqual([2, 0, 1, 2]);
    expect(cholesky(Float64Array.from([1, 1, 1, 1]), 2, 0)).toBeNull();
    // a pivot at or below the floor counts as a dependent column
    expect(cholesky(Float64Array.from([4, 2, 2, 5]), 2, 4)).toBeNull();
  });

  it("equals numpy's Cholesky factor of a random positive definite matrix", () => {
    const width = 7;
    const x = randomBlock(20, width, 'gram');
    const a = new Float64Array(width * width);
    for (let i = 0; i < width; i++) for (let j = 0; j < width; j++) for (let k = 0; k < 20; k++) a[i + j * width] += x[i * 20 + k] * x[j * 20 + k];
    const r = cholesky(a, width, 0)!;
    const reference = runPython<number[]>(
      `import json,sys,numpy as np
d=json.load(sys.stdin); b=d['width']; A=np.array(d['a']).reshape(b,b).T
print(json.dumps(np.linalg.cholesky(A).ravel().tolist()))`,
      { width, a: Array.from(a) },
    );
    // numpy gives the lower L = Rᵀ; its row-major ravel is R column-major
    expect(maxAbs(Array.from(r, (v, i) => v - reference[i]))).toBeLessThan(1e-14);
  });
});
