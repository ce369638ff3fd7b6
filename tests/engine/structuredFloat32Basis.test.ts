import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { subregionElements } from '../../server/engine/entropy';
import { getBackend } from '../../server/engine/linalg';
import type { LinearAlgebraBackend } from '../../server/engine/linalg/backend';
import { sprinkle } from '../../server/engine/sprinkle';
import { sqrtNCutoff } from '../../server/engine/truncation';
import { Basis, ROW_BLOCK } from '../../server/engine/structured/basis';
import { pauliJordan2DFromPoints } from '../../server/engine/structured/dominance2d';
import { factoredEntropy } from '../../server/engine/structured/factoredEntropy';
import { factoredDiagnostics, factoredState } from '../../server/engine/structured/factoredState';
import { FLOAT32_BASIS_FROM, topSkewPairs } from '../../server/engine/structured/lanczos';
import { structuredKernelsFor } from '../../server/engine/structured/nativeKernels';
import { runPython } from '../support/python';

/**
 * The Lanczos basis stored in float32 with every sum in float64 (server/engine/README.md §12; the
 * structured engine does this from FLOAT32_BASIS_FROM elements). What must not move: the σ above the
 * cut come from the projected T, built from float64 blocks, and the entropy from Ritz vectors formed
 * with the rounded basis. Checked on a real case — a 2D diamond sprinkling, the √N/(4π) cut and the
 * double-truncated entropy of the half-size sub-diamond — against the same solve with a float64 basis
 * (the form every other structured test checks against numpy and the dense engine), and the float32
 * products themselves against numpy on the same rounded numbers.
 */

const backends: [string, LinearAlgebraBackend | null][] = [
  ['plain JavaScript loops', null],
  [`the ${getBackend().name} backend`, getBackend()],
];

describe('a float32 Lanczos basis keeps the spectrum and the entropy', () => {
  const n = 2000;
  const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count: n, seed: 'float32-basis', prng: 'arc4' });
  const cut = sqrtNCutoff(n);
  const half = Math.SQRT2 / 2;
  const elements = subregionElements({ kind: 'diamond', past: { t: -half, x: 0 }, future: { t: half, x: 0 } }, s.points, 2);

  function solve(precision: 'float32' | 'float64', backend: LinearAlgebraBackend | null) {
    const pairs = topSkewPairs(pauliJordan2DFromPoints(s.points, { backend }), { cut, expectedPairs: 2 * Math.sqrt(n), basisPrecision: precision, backend });
    const state = factoredState(pairs, cut);
    return {
      pairs,
      entropy: factoredEntropy(state, elements, { doubleTruncation: true, backend: backend ?? getBackend('ml-matrix') }),
      diagnostics: factoredDiagnostics(state, pairs.relativeResiduals, backend ?? getBackend('ml-matrix')),
    };
  }

  it('is what the engine picks from FLOAT32_BASIS_FROM elements, float64 below', () => {
    expect(FLOAT32_BASIS_FROM).toBeGreaterThan(n);
    expect(solve('float64', getBackend()).pairs.basisPrecision).toBe('float64');
  });

  // the default backend only: the JavaScript kernels on a float32 basis are checked below, and a whole
  // solve on them takes most of a minute
  for (const [label, backend] of backends.slice(1)) {
    it(`σ above the cut to 1e-9 and the double-truncated S to 1e-6 relative of the float64 solve (${label}; measured 4e-10 and 2e-9)`, () => {
      const exact = solve('float64', backend);
      const single = solve('float32', backend);
      expect(single.pairs.basisPrecision).toBe('float32');
      expect(exact.pairs.basisPrecision).toBe('float64');
      // the float32 basis takes half the bytes
      expect(single.pairs.basisBytes / exact.pairs.basisBytes).toBeCloseTo(0.5, 2);
      expect(single.pairs.sigma.length).toBe(exact.pairs.sigma.length);
      expect(exact.pairs.sigma.length).toBeGreaterThan(50);
      for (let i = 0; i < exact.pairs.sigma.length; i++) {
        expect(Math.abs(single.pairs.sigma[i] - exact.pairs.sigma[i])).toBeLessThan(1e-9 * exact.pairs.sigma[i]);
      }
      expect(exact.entropy.S).toBeGreaterThan(1);
      expect(Math.abs(single.entropy.S - exact.entropy.S)).toBeLessThan(1e-6 * exact.entropy.S);
      expect(single.entropy.modesKept).toBe(exact.entropy.modesKept);
      // the rounding of the stored vectors shows in the factors' orthonormality, far below what the
      // checks of server/engine/README.md §5 would flag, and tr W stays the sum of the kept σ
      expect(single.diagnostics.basisOrthonormalityError).toBeLessThan(1e-5);
      expect(Math.abs(single.diagnostics.trace - single.diagnostics.positiveEigenvalueSum)).toBeLessThan(1e-6 * single.diagnostics.positiveEigenvalueSum);
    });
  }
});

describe('products with a float32 basis, summed in float64, against numpy', () => {
  const n = ROW_BLOCK + 37;
  // 41 columns: five groups of the native kernels' eight and a remainder, and enough work (rows × 41 × 16
  // above 2²²) that the products split over two threads where OpenBLAS has two
  const columns = 41;
  const width = 16;
  const random = seedrandom('float32-products');
  const v = Float64Array.from({ length: n * columns }, () => Math.fround(random() - 0.5));
  const w = Float64Array.from({ length: n * width }, () => random() - 0.5);
  const c = Float64Array.from({ length: columns * width }, () => random() - 0.5);
  // numpy in float64 on exactly the float32 values the basis holds
  const reference = runPython<{ project: number[]; subtract: number[]; combine: number[] }>(
    `import json,sys,numpy as np
d=json.load(sys.stdin); n=d['n']; m=d['m']; b=d['b']
V=np.array(d['v']).reshape(m,n).T; W=np.array(d['w']).reshape(b,n).T; C=np.array(d['c']).reshape(b,m).T
print(json.dumps({'project':(V.T@W).T.ravel().tolist(),'subtract':(W-V@C).T.ravel().tolist(),'combine':(V@C).T.ravel().tolist()}))`,
    { n, m: columns, b: width, v: Array.from(v), w: Array.from(w), c: Array.from(c) },
  );
  const maxDifference = (a: ArrayLike<number>, b: ArrayLike<number>) => {
    expect(a.length).toBe(b.length);
    let m = 0;
    for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
    return m;
  };

  for (const [label, backend] of backends) {
    it(`Vᵀ W, W − V C and V C to float64 rounding (${label})`, () => {
      const basis = new Basis(n, 4, backend, 'float32');
      basis.push(v.subarray(0, 5 * n), 5);
      basis.push(v.subarray(5 * n), columns - 5);
      // the stored values are the float32 numbers themselves, so the sums owe nothing to single precision
      expect(maxDifference(basis.project(w, width), reference.project)).toBeLessThan(1e-12);
      const rest = Float64Array.from(w);
      basis.subtract(c, rest, width);
      expect(maxDifference(rest, reference.subtract)).toBeLessThan(1e-13);
      const combined = basis.combineAndRelease(c, width);
      const flat = new Float64Array(n * width);
      combined.forEach((column, k) => flat.set(column, k * n));
      expect(maxDifference(flat, reference.combine)).toBeLessThan(1e-13);
    });
  }

  it('the native kernels are in use when the native backend serves', () => {
    if (getBackend().name !== 'native') return expect(structuredKernelsFor(getBackend())).toBeNull();
    expect(structuredKernelsFor(getBackend())).not.toBeNull();
  });
});
