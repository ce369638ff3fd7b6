import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { getBackend } from '../../server/engine/linalg';
import type { LinearAlgebraBackend } from '../../server/engine/linalg/backend';
import { Basis, ROW_BLOCK } from '../../server/engine/structured/basis';
import { columnNorms, orthogonaliseBlock } from '../../server/engine/structured/blockGramSchmidt';
import { blockQr } from '../../server/engine/structured/choleskyQr';
import { runPython } from '../support/python';

function randomBlock(n: number, width: number, seed: string): Float64Array {
  const random = seedrandom(seed);
  return Float64Array.from({ length: n * width }, () => random() - 0.5);
}

function maxAbsDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

const backends: [string, LinearAlgebraBackend | null][] = [
  ['plain JavaScript loops', null],
  [`the ${getBackend().name} backend`, getBackend()],
];

// widths 16 and 8 take the native kernels' fixed-width tiles (16 also the AVX-512 ones where the
// processor has them), 3 the general loop
describe.each([3, 8, 16])('Lanczos basis storage in row blocks, against numpy (block width %i)', (width) => {
  // two row blocks, the second short, so every product is split and summed across blocks; 7 columns
  // leave a remainder after the kernels' groups of 4 and of 8
  const n = ROW_BLOCK + 37;
  const columns = 7;
  const v = randomBlock(n, columns, 'basis-v');
  const w = randomBlock(n, width, 'basis-w');
  const c = randomBlock(columns, width, 'basis-c');
  const reference = runPython<{ project: number[]; subtract: number[]; combine: number[] }>(
    `import json,sys,numpy as np
d=json.load(sys.stdin); n=d['n']; m=d['m']; b=d['b']
V=np.array(d['v']).reshape(m,n).T; W=np.array(d['w']).reshape(b,n).T; C=np.array(d['c']).reshape(b,m).T
print(json.dumps({'project':(V.T@W).T.ravel().tolist(),'subtract':(W-V@C).T.ravel().tolist(),'combine':(V@C).T.ravel().tolist()}))`,
    { n, m: columns, b: width, v: Array.from(v), w: Array.from(w), c: Array.from(c) },
  );

  /** a basis holding the columns of v, pushed 3 + 4 so that the storage grows past its first capacity */
  function filled(backend: LinearAlgebraBackend | null): Basis {
    const basis = new Basis(n, 4, backend);
    basis.push(v.subarray(0, 3 * n), 3);
    basis.push(v.subarray(3 * n), 4);
    expect(basis.count).toBe(columns);
    return basis;
  }

  for (const [label, backend] of backends) {
    it(`projects, subtracts and combines like Vᵀ W, W − V C and V C (${label})`, () => {
      const basis = filled(backend);
      expect(maxAbsDifference(basis.project(w, width), reference.project)).toBeLessThan(1e-12);
      const rest = Float64Array.from(w);
      basis.subtract(c, rest, width);
      expect(maxAbsDifference(rest, reference.subtract)).toBeLessThan(1e-14);
      const combined = basis.combineAndRelease(c, width);
      const flat = new Float64Array(n * width);
      combined.forEach((column, k) => flat.set(column, k * n));
      expect(maxAbsDifference(flat, reference.combine)).toBeLessThan(1e-14);
      // the storage is handed back as it is read, and the basis is empty afterwards
      expect(basis.count).toBe(0);
    });
  }

  it('projects onto nothing while empty', () => {
    const basis = new Basis(n, 4, null);
    expect(basis.project(w, width).length).toBe(0);
    const rest = Float64Array.from(w);
    basis.subtract(new Float64Array(0), rest, width);
    expect(Array.from(rest)).toEqual(Array.from(w));
  });
});

describe('block Gram–Schmidt of a new Lanczos block against the basis', () => {
  for (const [label, backend] of backends) {
    it(`leaves the block orthogonal to the basis and returns the removed coefficients (${label})`, () => {
      const n = 300;
      const blockWidth = 4;
      const basis = new Basis(n, 16, backend);
      // three orthonormal blocks; the last two are the "recent" ones the three-term relation names
      for (let k = 0; k < 3; k++) {
        const block = randomBlock(n, blockWidth, `gs-${k}`);
        basis.subtract(basis.project(block, blockWidth), block, blockWidth);
        basis.subtract(basis.project(block, blockWidth), block, blockWidth);
        blockQr(basis, block, blockWidth, 1, seedrandom('gs'), null);
        basis.push(block, blockWidth);
      }
      const recent = new Float64Array(2 * blockWidth * n);
      const all = basis.combineAndRelease(Float64Array.from({ length: 12 * 12 }, (_, i) => (i % 13 === 0 ? 1 : 0)), 12);
      all.slice(4).forEach((column, k) => recent.set(column, k * n));
      const stored = new Basis(n, 16, backend);
      all.forEach((column) => stored.push(column, 1));

      // a block mostly along the recent columns, as ΔV_i is, plus a part outside the basis
      const original = randomBlock(n, blockWidth, 'gs-new');
      for (let lane = 0; lane < blockWidth; lane++) {
        for (let k = 0; k < 8; k++) for (let i = 0; i < n; i++) original[lane * n + i] += (k + lane + 1) * recent[k * n + i];
      }
      const w = Float64Array.from(original);
      const coefficients = orthogonaliseBlock(stored, w, blockWidth, recent, 2 * blockWidth, backend);
      expect(coefficients.length).toBe(12 * blockWidth);

      const reference = runPython<{ coefficients: number[]; rest: number[] }>(
        `import json,sys,numpy as np
d=json.load(sys.stdin); n=d['n']; b=d['b']
V=np.array(d['v']).reshape(12,n).T; W=np.array(d['w']).reshape(b,n).T
C=V.T@W
print(json.dumps({'coefficients':C.T.ravel().tolist(),'rest':(W-V@C).T.ravel().tolist()}))`,
        { n, b: blockWidth, v: all.flatMap((column) => Array.from(column)), w: Array.from(original) },
      );
      // V orthonormal: the coefficients are Vᵀ W and what is left is (I − V Vᵀ) W
      expect(maxAbsDifference(coefficients, reference.coefficients)).toBeLessThan(1e-12);
      expect(maxAbsDifference(w, reference.rest)).toBeLessThan(1e-13);
      const norms = columnNorms(w, n, blockWidth);
      const left = stored.project(w, blockWidth);
      for (let lane = 0; lane < blockWidth; lane++) {
        for (let j = 0; j < 12; j++) expect(Math.abs(left[j + lane * 12])).toBeLessThan(1e-14 * norms[lane]);
      }
    });
  }

  it('measures column norms', () => {
    // worked example: (3, 4) has length 5, (0, −2) length 2
    expect(Array.from(columnNorms(Float64Array.from([3, 4, 0, -2]), 2, 2))).toEqual([5, 2]);
  });
});
