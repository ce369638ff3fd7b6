/**
 * The two dense backends against each other, against numpy/scipy (Debian's /usr/bin/python3) and on the
 * reference causal set fixtures/diamond300.* (server/engine/README.md §13, computed with numpy 1.24.2
 * and LAPACK). The native half runs when the addon is built (npm run build:native); the fallback half always.
 */
import { spawnSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { readFileSync, writeFileSync, mkdtempSync } from 'node:fs';
import os, { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { DenseMatrix, LinearAlgebraBackend } from '../../server/engine/linalg/backend';
import { backendSelection, getBackend } from '../../server/engine/linalg';
import { mlMatrixBackend } from '../../server/engine/linalg/mlMatrixBackend';
import { loadNativeBackend, nativeBackendStatus, OtherProcessesLoad, threadsForLoad } from '../../server/engine/linalg/nativeBackend';
import { computeVacuum, type VacuumRequest } from '../../server/engine';

const native = nativeBackendStatus();
const nativeBackend = native.backend as LinearAlgebraBackend;

/** Park–Miller style generator: reproducible inputs without depending on the engine's PRNG. */
function generator(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647 - 0.5;
  };
}

function randomMatrix(rows: number, cols: number, seed: number): DenseMatrix {
  const next = generator(seed);
  return { rows, cols, data: Float64Array.from({ length: rows * cols }, next) };
}

function randomSymmetric(n: number, seed: number): DenseMatrix {
  const m = randomMatrix(n, n, seed);
  for (let j = 0; j < n; j++) for (let i = 0; i < j; i++) m.data[i + j * n] = m.data[j + i * n];
  return m;
}

/** Δᵀ Δ of a 2D sprinkled diamond's Pauli–Jordan matrix (K = ½Cᵀ, Johnston 2008), built directly. */
function pauliJordanGram(n: number, seed: number): { delta: DenseMatrix; gram: DenseMatrix } {
  const next = generator(seed);
  const u = Array.from({ length: n }, next);
  const v = Array.from({ length: n }, next);
  const delta: DenseMatrix = { rows: n, cols: n, data: new Float64Array(n * n) };
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      // i ≺ j: K[j][i] = ½, Δ = K − Kᵀ
      if (u[i] < u[j] && v[i] < v[j]) {
        delta.data[j + i * n] = 0.5;
        delta.data[i + j * n] = -0.5;
      }
    }
  }
  return { delta, gram: mlMatrixBackend.gram(delta) };
}

function maxAbsDifference(a: Float64Array, b: Float64Array): number {
  expect(a.length).toBe(b.length);
  let d = 0;
  for (let k = 0; k < a.length; k++) d = Math.max(d, Math.abs(a[k] - b[k]));
  return d;
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (const v of a) m = Math.max(m, Math.abs(v));
  return m;
}

function transpose(a: DenseMatrix): DenseMatrix {
  const t: DenseMatrix = { rows: a.cols, cols: a.rows, data: new Float64Array(a.data.length) };
  for (let j = 0; j < a.cols; j++) for (let i = 0; i < a.rows; i++) t.data[j + i * a.cols] = a.data[i + j * a.rows];
  return t;
}

/** Runs numpy/scipy on column-major matrices passed as .npy-free raw float64 files; returns parsed JSON. */
function numpy(script: string, matrices: Record<string, DenseMatrix>): unknown {
  const dir = mkdtempSync(path.join(tmpdir(), 'tacet-numpy-'));
  const loads: string[] = [];
  for (const [name, m] of Object.entries(matrices)) {
    const file = path.join(dir, `${name}.bin`);
    writeFileSync(file, Buffer.from(m.data.buffer, m.data.byteOffset, m.data.byteLength));
    loads.push(`${name} = np.fromfile(${JSON.stringify(file)}, dtype=np.float64).reshape((${m.cols}, ${m.rows})).T`);
  }
  const program = ['import json, numpy as np, scipy.linalg as sl', ...loads, script].join('\n');
  const run = spawnSync('/usr/bin/python3', ['-c', program], { encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`python3 failed: ${run.stderr}`);
  return JSON.parse(run.stdout);
}

const pythonWithNumpy = spawnSync('/usr/bin/python3', ['-c', 'import numpy, scipy'], { encoding: 'utf8' }).status === 0;

describe('native build script (scripts/build-native.mjs)', () => {
  const script = path.resolve(import.meta.dirname, '..', '..', 'scripts', 'build-native.mjs');
  const run = (args: string[]) =>
    spawnSync(process.execPath, [script, ...args], { encoding: 'utf8', env: { ...process.env, TACET_SKIP_NATIVE_BUILD: '1' } });

  it('as postinstall (--optional) never fails the install and says why nothing was built', () => {
    const result = run(['--optional']);
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/native addon not built: TACET_SKIP_NATIVE_BUILD=1; the engine will use its pure-JavaScript \(ml-matrix\) backend/);
  });

  it('as build:native reports the failure with a non-zero exit', () => {
    const result = run([]);
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/failed: TACET_SKIP_NATIVE_BUILD=1/);
  });
});

describe('native backend loading', () => {
  it('reports a missing addon with a reason instead of throwing', () => {
    const missing = loadNativeBackend('/nonexistent/tacet_linalg.node');
    expect(missing.backend).toBeNull();
    expect(missing.reason).toMatch(/not built .*missing/);
  });

  it('reports a file that is not an addon as a load failure', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'tacet-addon-'));
    const bogus = path.join(dir, 'tacet_linalg.node');
    writeFileSync(bogus, 'not a shared object');
    const result = loadNativeBackend(bogus);
    expect(result.backend).toBeNull();
    expect(result.reason).toMatch(/failed to load/);
  });

  it('the thread policy leaves other processes their cores, measured without this process', () => {
    // threads = cores − cores busy elsewhere, rounded, at least one (module note in nativeBackend.ts)
    expect(threadsForLoad(0.1, 2)).toBe(2);
    expect(threadsForLoad(0.9, 2)).toBe(1);
    expect(threadsForLoad(6, 2)).toBe(1);
    expect(threadsForLoad(3, 8)).toBe(5);
    expect(threadsForLoad(0, 1)).toBe(1);
    // machine busy time less own CPU time over the window: here others use 0.5 core while this
    // process uses 2, and nothing is read before the window has passed
    let time = 0;
    let machine = 0;
    let own = 0;
    const load = new OtherProcessesLoad(() => time, () => machine, () => own, 0.1);
    expect(load.read()).toBeNull();
    time = 0.05;
    expect(load.read()).toBeNull();
    time = 1;
    machine = 2.5;
    own = 2;
    expect(load.read()).toBeCloseTo(0.5, 12);
    time = 1.02; // within the window: the previous estimate stands
    machine = 10;
    expect(load.read()).toBeCloseTo(0.5, 12);
    time = 2;
    machine = 10.1; // 7.6 busy s in 1 s is impossible on two cores, but the arithmetic is what is tested
    own = 2.5;
    expect(load.read()).toBeCloseTo(7.1, 12);
    // a live reading on this machine is a number of cores between 0 and the core count (plus rounding)
    const live = new OtherProcessesLoad(undefined, undefined, undefined, 0);
    const busy = live.read();
    expect(busy).not.toBeNull();
    expect(busy!).toBeGreaterThanOrEqual(0);
  });

  it.runIf(native.backend)('TACET_BLAS_THREADS fixes the OpenBLAS thread count and rejects nonsense', () => {
    const saved = process.env.TACET_BLAS_THREADS;
    try {
      process.env.TACET_BLAS_THREADS = '1';
      expect(loadNativeBackend(native.addonPath).blasThreads).toBe(1);
      process.env.TACET_BLAS_THREADS = 'many';
      expect(loadNativeBackend(native.addonPath).reason).toMatch(/TACET_BLAS_THREADS must be auto or a positive integer, got "many"/);
    } finally {
      process.env.TACET_BLAS_THREADS = String(os.availableParallelism());
      loadNativeBackend(native.addonPath);
      if (saved === undefined) delete process.env.TACET_BLAS_THREADS;
      else process.env.TACET_BLAS_THREADS = saved;
    }
  });

  describe('selection', () => {
    const saved = { linalg: process.env.TACET_LINALG, addon: process.env.TACET_NATIVE_ADDON };
    afterEach(() => {
      for (const [key, value] of [['TACET_LINALG', saved.linalg], ['TACET_NATIVE_ADDON', saved.addon]] as const) {
        if (value === undefined) delete process.env[key];
        else process.env[key] = value;
      }
      vi.resetModules();
    });

    it('TACET_LINALG=ml-matrix forces the fallback for auto and says so', () => {
      process.env.TACET_LINALG = 'ml-matrix';
      expect(getBackend('auto').name).toBe('ml-matrix');
      expect(backendSelection()).toMatchObject({ name: 'ml-matrix', nativeUnavailableReason: expect.stringMatching(/TACET_LINALG/) });
    });

    it('rejects an unknown TACET_LINALG value', () => {
      process.env.TACET_LINALG = 'lapack';
      expect(() => getBackend('auto')).toThrow(/TACET_LINALG must be auto, native or ml-matrix/);
    });

    it('a missing addon makes auto fall back to ml-matrix with the reason, and native fail with it', async () => {
      delete process.env.TACET_LINALG;
      process.env.TACET_NATIVE_ADDON = '/nonexistent/tacet_linalg.node';
      vi.resetModules();
      const fresh = await import('../../server/engine/linalg');
      expect(fresh.getBackend('auto').name).toBe('ml-matrix');
      expect(fresh.backendSelection().nativeUnavailableReason).toMatch(/nonexistent.*missing/);
      expect(() => fresh.getBackend('native')).toThrow(/not available: native addon not built/);
      process.env.TACET_LINALG = 'native';
      expect(() => fresh.getBackend('auto')).toThrow(/TACET_LINALG=native but native addon not built/);
    });

    it.runIf(native.backend)('auto picks native when the addon loads', () => {
      delete process.env.TACET_LINALG;
      expect(getBackend('auto').name).toBe('native');
      expect(backendSelection()).toMatchObject({ name: 'native', nativeUnavailableReason: null });
      expect(native.blasConfig).toMatch(/OpenBLAS/);
    });
  });
});

describe.skipIf(!native.backend)(`native (OpenBLAS/LAPACK) against ml-matrix${native.reason ? ` — skipped: ${native.reason}` : ''}`, () => {
  it('eigenvalues of ΔᵀΔ agree to 1e-10 of λ_max, with and without vectors', () => {
    const { gram } = pauliJordanGram(240, 7);
    const reference = mlMatrixBackend.symmetricEigen(gram);
    const full = nativeBackend.symmetricEigen(gram);
    const valuesOnly = nativeBackend.symmetricEigen(gram, { vectors: false });
    const top = reference.values[reference.values.length - 1];
    expect(maxAbsDifference(full.values, reference.values) / top).toBeLessThan(1e-10);
    expect(maxAbsDifference(valuesOnly.values, reference.values) / top).toBeLessThan(1e-10);
    expect(valuesOnly.vectors).toBeNull();
    // ascending order, as the interface promises
    for (let k = 1; k < full.values.length; k++) expect(full.values[k]).toBeGreaterThanOrEqual(full.values[k - 1]);
  });

  it('eigenvectors satisfy A V = V Λ and span the same top subspace as ml-matrix', () => {
    const { gram } = pauliJordanGram(200, 11);
    const n = gram.rows;
    const ours = nativeBackend.symmetricEigen(gram);
    const theirs = mlMatrixBackend.symmetricEigen(gram);
    const v = ours.vectors as DenseMatrix;
    const av = nativeBackend.multiply(gram, v);
    const top = ours.values[n - 1];
    let residual = 0;
    for (let c = 0; c < n; c++) for (let i = 0; i < n; i++) residual = Math.max(residual, Math.abs(av.data[i + c * n] - ours.values[c] * v.data[i + c * n]));
    expect(residual / top).toBeLessThan(1e-12);
    const vtv = nativeBackend.multiply(v, v, { transposeA: true });
    for (let c = 0; c < n; c++) vtv.data[c + c * n] -= 1;
    expect(maxAbs(vtv.data)).toBeLessThan(1e-12);
    // the eigenvalues come in exact pairs, so compare projectors onto whole pairs (the top 20 pairs)
    const projector = (vectors: DenseMatrix) => {
      const cols: DenseMatrix = { rows: n, cols: 40, data: vectors.data.slice((n - 40) * n) };
      return mlMatrixBackend.multiply(cols, cols, { transposeB: true });
    };
    expect(maxAbsDifference(projector(v).data, projector(theirs.vectors as DenseMatrix).data)).toBeLessThan(1e-9);
  });

  it('the blocked back-transformation (default) gives what LAPACK dsyevd gives; overwriteInput only saves a copy', () => {
    // 300 = two whole blocks of 128 reflectors and a partial one
    const { gram } = pauliJordanGram(300, 13);
    const n = gram.rows;
    const addon = createRequire(import.meta.url)(native.addonPath) as {
      symmetricEigen(n: number, a: Float64Array, vectors: boolean, above?: number, algorithm?: string, overwrite?: boolean): { values: Float64Array; vectors: Float64Array };
    };
    const lapack = addon.symmetricEigen(n, gram.data, true, undefined, 'dsyevd');
    const blocked = addon.symmetricEigen(n, gram.data, true, undefined, 'tridiagonal');
    const top = lapack.values[n - 1];
    expect(maxAbsDifference(blocked.values, lapack.values) / top).toBeLessThan(1e-12);
    // eigenvalues come in pairs, so compare the projectors onto each of the top 30 pairs
    const pairProjector = (vectors: Float64Array, pair: number) => {
      const cols: DenseMatrix = { rows: n, cols: 2, data: vectors.slice((n - 2 * pair - 2) * n, (n - 2 * pair) * n) };
      return mlMatrixBackend.multiply(cols, cols, { transposeB: true }).data;
    };
    for (let pair = 0; pair < 30; pair++) {
      expect(maxAbsDifference(pairProjector(blocked.vectors, pair), pairProjector(lapack.vectors, pair))).toBeLessThan(1e-9);
    }
    const scratch = Float64Array.from(gram.data);
    const inPlace = nativeBackend.symmetricEigen({ rows: n, cols: n, data: scratch }, { overwriteInput: true });
    // the same to rounding (the thread policy may run it on another OpenBLAS thread count)
    expect(maxAbsDifference(inPlace.values, blocked.values) / top).toBeLessThan(1e-13);
    for (let pair = 0; pair < 30; pair++) {
      expect(maxAbsDifference(pairProjector((inPlace.vectors as DenseMatrix).data, pair), pairProjector(blocked.vectors, pair))).toBeLessThan(1e-9);
    }
    // the input served as workspace (it now holds reflectors), as the option allows
    expect(maxAbsDifference(scratch, gram.data)).toBeGreaterThan(0);
    // without the option the input is left alone
    const kept = Float64Array.from(gram.data);
    nativeBackend.symmetricEigen({ rows: n, cols: n, data: kept });
    expect(maxAbsDifference(kept, gram.data)).toBe(0);
  });

  it('cholesky (dpotrf) equals ml-matrix, reads only the lower triangle and answers null when not positive definite', () => {
    const n = 80;
    const m = randomMatrix(n, n, 31);
    const spd = mlMatrixBackend.gram(m);
    for (let i = 0; i < n; i++) spd.data[i + i * n] += 1;
    const ours = nativeBackend.cholesky(spd) as DenseMatrix;
    const theirs = mlMatrixBackend.cholesky(spd) as DenseMatrix;
    expect(maxAbsDifference(ours.data, theirs.data) / maxAbs(theirs.data)).toBeLessThan(1e-12);
    for (let j = 0; j < n; j++) for (let i = 0; i < j; i++) expect(ours.data[i + j * n]).toBe(0);
    const llt = nativeBackend.multiply(ours, ours, { transposeB: true });
    expect(maxAbsDifference(llt.data, spd.data) / maxAbs(spd.data)).toBeLessThan(1e-13);
    const lowerOnly = { ...spd, data: Float64Array.from(spd.data) };
    for (let j = 0; j < n; j++) for (let i = 0; i < j; i++) lowerOnly.data[i + j * n] = 1e6;
    expect(Array.from((nativeBackend.cholesky(lowerOnly) as DenseMatrix).data)).toEqual(Array.from(ours.data));
    const indefinite = { ...spd, data: Float64Array.from(spd.data) };
    indefinite.data[5 + 5 * n] = -1;
    expect(nativeBackend.cholesky(indefinite)).toBeNull();
    expect(mlMatrixBackend.cholesky(indefinite)).toBeNull();
    expect(() => nativeBackend.cholesky(randomMatrix(3, 4, 1))).toThrow(/square matrix, got 3×4/);
  });

  it('the range above a cut (dsyevr) returns exactly the eigenpairs above it', () => {
    const { gram } = pauliJordanGram(300, 5);
    const n = gram.rows;
    const all = mlMatrixBackend.symmetricEigen(gram, { vectors: false }).values;
    // √N/(4π) on σ, squared for ΔᵀΔ (Sorkin–Yazdi 2018 cut, server/engine/README.md §7)
    const cut = n / (16 * Math.PI ** 2);
    const expected = all.filter((x) => x > cut);
    const above = nativeBackend.symmetricEigen(gram, { above: cut });
    expect(above.values.length).toBe(expected.length);
    expect(expected.length % 2).toBe(0);
    expect(maxAbsDifference(above.values, Float64Array.from(expected)) / all[n - 1]).toBeLessThan(1e-10);
    const vectors = above.vectors as DenseMatrix;
    expect(vectors.rows).toBe(n);
    expect(vectors.cols).toBe(expected.length);
    const av = nativeBackend.multiply(gram, vectors);
    let residual = 0;
    for (let c = 0; c < vectors.cols; c++) for (let i = 0; i < n; i++) residual = Math.max(residual, Math.abs(av.data[i + c * n] - above.values[c] * vectors.data[i + c * n]));
    expect(residual / all[n - 1]).toBeLessThan(1e-12);
    expect(nativeBackend.symmetricEigen(gram, { above: cut, vectors: false }).values).toEqual(above.values);
    expect(nativeBackend.symmetricEigen(gram, { above: 2 * all[n - 1] }).values.length).toBe(0);
  });

  it('eigenvalues of a random symmetric matrix (negative ones too) agree, and only the lower triangle is read', () => {
    const a = randomSymmetric(150, 3);
    const reference = mlMatrixBackend.symmetricEigen(a, { vectors: false }).values;
    const scale = maxAbs(reference);
    const lowerOnly: DenseMatrix = { ...a, data: Float64Array.from(a.data) };
    for (let j = 0; j < a.cols; j++) for (let i = 0; i < j; i++) lowerOnly.data[i + j * a.rows] = Number.NaN;
    expect(maxAbsDifference(nativeBackend.symmetricEigen(lowerOnly).values, reference) / scale).toBeLessThan(1e-10);
    const above = nativeBackend.symmetricEigen(a, { above: 0.5 }).values;
    expect(Array.from(above)).toEqual(Array.from(above).filter((x) => x > 0.5));
    expect(maxAbsDifference(above, reference.filter((x) => x > 0.5)) / scale).toBeLessThan(1e-10);
  });

  it('products with every transpose combination agree to 1e-12', () => {
    const a = randomMatrix(37, 23, 1);
    const b = randomMatrix(23, 41, 2);
    const at = transpose(a);
    const bt = transpose(b);
    const cases: [DenseMatrix, DenseMatrix, { transposeA?: boolean; transposeB?: boolean }][] = [
      [a, b, {}],
      [at, b, { transposeA: true }],
      [a, bt, { transposeB: true }],
      [at, bt, { transposeA: true, transposeB: true }],
    ];
    const reference = mlMatrixBackend.multiply(a, b);
    for (const [x, y, options] of cases) {
      const c = nativeBackend.multiply(x, y, options);
      expect([c.rows, c.cols]).toEqual([37, 41]);
      expect(maxAbsDifference(c.data, reference.data)).toBeLessThan(1e-12);
      expect(maxAbsDifference(c.data, mlMatrixBackend.multiply(x, y, options).data)).toBeLessThan(1e-12);
    }
    expect(() => nativeBackend.multiply(a, a)).toThrow(/cannot multiply 37×23 by 37×23/);
  });

  it('gram (dsyrk) equals AᵀA with both triangles filled', () => {
    const a = randomMatrix(90, 70, 4);
    const g = nativeBackend.gram(a);
    expect([g.rows, g.cols]).toEqual([70, 70]);
    expect(maxAbsDifference(g.data, mlMatrixBackend.gram(a).data)).toBeLessThan(1e-12);
    for (let j = 0; j < 70; j++) for (let i = 0; i < j; i++) expect(g.data[i + j * 70]).toBe(g.data[j + i * 70]);
  });

  it('gram of a 0/±h matrix (a massless Δ) takes the single-precision integer route and stays exact', () => {
    const { delta } = pauliJordanGram(150, 23);
    // h = ½: every entry of ΔᵀΔ is a multiple of ¼ below 150/4, exact in double either way
    expect(Array.from(nativeBackend.gram(delta).data)).toEqual(Array.from(mlMatrixBackend.gram(delta).data));
    // the 4D link weight √ρ/(2π√6) at ρ = 10 is no power of two: h² times the exact integer SᵀS, one
    // rounding per entry (the double-precision sum rounds at every term instead)
    const h = Math.sqrt(10) / (2 * Math.PI * Math.sqrt(6));
    const signs = { ...delta, data: delta.data.map((v) => Math.sign(v)) };
    const scaled = { ...delta, data: signs.data.map((v) => v * h) };
    const integerGram = mlMatrixBackend.gram(signs).data;
    const ours = nativeBackend.gram(scaled).data;
    expect(Array.from(ours)).toEqual(Array.from(integerGram, (k) => h * h * k));
    expect(maxAbsDifference(ours, mlMatrixBackend.gram(scaled).data) / maxAbs(ours)).toBeLessThan(1e-14);
    // one entry off the pattern: the general route, same answer to rounding
    const mixed = { ...delta, data: Float64Array.from(delta.data) };
    mixed.data[7] = 0.25;
    expect(maxAbsDifference(nativeBackend.gram(mixed).data, mlMatrixBackend.gram(mixed).data)).toBeLessThan(1e-12);
  });

  it('triangular solves (dtrsm) agree for lower/upper, unit diagonal and transpose', () => {
    const n = 60;
    const t = randomMatrix(n, n, 9);
    for (let i = 0; i < n; i++) t.data[i + i * n] = 2 + Math.abs(t.data[i + i * n]);
    const b = randomMatrix(n, 5, 10);
    for (const lower of [true, false]) {
      for (const unitDiagonal of [false, true]) {
        for (const transpose of [false, true]) {
          const options = { lower, unitDiagonal, transpose };
          const ours = nativeBackend.solveTriangular(t, b, options);
          const theirs = mlMatrixBackend.solveTriangular(t, b, options);
          expect(maxAbsDifference(ours.data, theirs.data) / maxAbs(theirs.data)).toBeLessThan(1e-12);
        }
      }
    }
    const singular = { ...t, data: Float64Array.from(t.data) };
    singular.data[3 + 3 * n] = 0;
    expect(() => nativeBackend.solveTriangular(singular, b, { lower: true })).toThrow(/singular: diagonal entry 3/);
  });

  it('bad input gets a clear error', () => {
    expect(() => nativeBackend.symmetricEigen(randomMatrix(3, 4, 1))).toThrow(/square matrix, got 3×4/);
    expect(() => nativeBackend.gram({ rows: 3, cols: 3, data: new Float64Array(8) })).toThrow(/needs 9 entries, has 8/);
    const withNaN = randomSymmetric(4, 2);
    withNaN.data[2] = Number.NaN;
    expect(() => nativeBackend.symmetricEigen(withNaN)).toThrow(/entry \(2, 0\) is not finite/);
    expect(nativeBackend.symmetricEigen({ rows: 0, cols: 0, data: new Float64Array(0) }).values.length).toBe(0);
  });

  it.runIf(pythonWithNumpy)('cholesky matches numpy.linalg.cholesky', () => {
    const m = randomMatrix(40, 40, 41);
    const spd = mlMatrixBackend.gram(m);
    for (let i = 0; i < 40; i++) spd.data[i + i * 40] += 0.5;
    // reference: numpy.linalg.cholesky (Debian python3-numpy, LAPACK potrf), the lower factor
    const out = numpy('print(json.dumps(np.linalg.cholesky(S).flatten(order="F").tolist()))', { S: spd }) as number[];
    for (const backend of [nativeBackend, mlMatrixBackend]) {
      const l = (backend.cholesky(spd) as DenseMatrix).data;
      expect(maxAbsDifference(l, Float64Array.from(out)) / maxAbs(l)).toBeLessThan(1e-12);
    }
  });

  it.runIf(pythonWithNumpy)('matches numpy/scipy (LAPACK eigvalsh, matmul, solve_triangular)', () => {
    const { delta, gram } = pauliJordanGram(120, 21);
    const t = randomMatrix(50, 50, 17);
    for (let i = 0; i < 50; i++) t.data[i + i * 50] = 3;
    const b = randomMatrix(50, 4, 18);
    // reference: numpy.linalg.eigvalsh, numpy matmul, scipy.linalg.solve_triangular (Debian python3-numpy/-scipy)
    const out = numpy(
      [
        'print(json.dumps({',
        '  "eig": np.linalg.eigvalsh(G).tolist(),',
        '  "prod": (D.T @ G).flatten(order="F").tolist(),',
        '  "tri": sl.solve_triangular(T, B, lower=True, trans=1).flatten(order="F").tolist(),',
        '}))',
      ].join('\n'),
      { G: gram, D: delta, T: t, B: b },
    ) as { eig: number[]; prod: number[]; tri: number[] };
    const eig = nativeBackend.symmetricEigen(gram, { vectors: false }).values;
    expect(maxAbsDifference(eig, Float64Array.from(out.eig)) / eig[eig.length - 1]).toBeLessThan(1e-10);
    const prod = nativeBackend.multiply(delta, gram, { transposeA: true }).data;
    expect(maxAbsDifference(prod, Float64Array.from(out.prod)) / maxAbs(prod)).toBeLessThan(1e-12);
    const tri = nativeBackend.solveTriangular(t, b, { lower: true, transpose: true }).data;
    expect(maxAbsDifference(tri, Float64Array.from(out.tri)) / maxAbs(tri)).toBeLessThan(1e-12);
  });
});

describe('dense pipeline on both backends, fixtures/diamond300 (numpy 1.24.2 + LAPACK reference, server/engine/README.md §13)', () => {
  const fixtureDir = path.resolve(import.meta.dirname, '..', '..', 'fixtures');
  const reference = JSON.parse(readFileSync(path.join(fixtureDir, 'diamond300.ref.json'), 'utf8')) as {
    positive_eigs: number[];
    S_untruncated: number;
    S_double_truncated: number;
  };
  const points = readFileSync(path.join(fixtureDir, 'diamond300.csv'), 'utf8')
    .trim()
    .split('\n')
    .slice(1)
    .flatMap((line) => line.split(',').map(Number));
  const half = Math.SQRT1_2;
  const request = (doubleTruncation: boolean): VacuumRequest => ({
    source: {
      kind: 'points',
      points,
      dimension: 2,
      region: { kind: 'diamond2d', past: { t: -Math.SQRT2, x: 0 }, future: { t: Math.SQRT2, x: 0 } },
    },
    truncation: doubleTruncation ? { rule: 'sqrtN' } : { rule: 'none' },
    subregion: { kind: 'diamond', past: { t: -half, x: 0 }, future: { t: half, x: 0 } },
    doubleTruncation,
  });

  const saved = process.env.TACET_LINALG;
  afterEach(() => {
    if (saved === undefined) delete process.env.TACET_LINALG;
    else process.env.TACET_LINALG = saved;
  });

  it('the forced fallback (TACET_LINALG=ml-matrix) reproduces the numpy entropies', { timeout: 60_000 }, async () => {
    process.env.TACET_LINALG = 'ml-matrix';
    const truncated = await computeVacuum(request(true));
    expect(truncated.backend).toBe('ml-matrix');
    expect(Math.abs((truncated.entropy?.S ?? NaN) - reference.S_double_truncated)).toBeLessThan(1e-8);
  });

  it.runIf(native.backend)('native and ml-matrix give the same spectrum and entropies (1e-9), both matching numpy', { timeout: 120_000 }, async () => {
    for (const doubleTruncation of [false, true]) {
      const ours = await computeVacuum({ ...request(doubleTruncation), backend: 'native' });
      const fallback = await computeVacuum({ ...request(doubleTruncation), backend: 'ml-matrix' });
      expect(ours.backend).toBe('native');
      expect(fallback.backend).toBe('ml-matrix');
      const top = reference.positive_eigs[0];
      // the decomposed matrix is ΔᵀΔ: its eigenvalues σ² agree to 1e-10 of the largest; σ near zero
      // inherits an absolute error of about √ε‖Δ‖ from the square root (server/engine/README.md §6)
      const squares = (values: Float64Array) => values.map((x) => x * x);
      expect(maxAbsDifference(squares(ours.eigenvalues), squares(fallback.eigenvalues)) / top ** 2).toBeLessThan(1e-10);
      // above the kernel the eigenvalues match numpy's complex Hermitian eigh closely
      for (let k = 0; k < 100; k++) expect(Math.abs(ours.eigenvalues[k] - reference.positive_eigs[k]) / top).toBeLessThan(1e-10);
      const S = ours.entropy?.S as number;
      const expected = doubleTruncation ? reference.S_double_truncated : reference.S_untruncated;
      expect(Math.abs(S - (fallback.entropy?.S as number)) / Math.abs(expected)).toBeLessThan(1e-9);
      expect(Math.abs(S - expected) / Math.abs(expected)).toBeLessThan(1e-9);
      expect(ours.entropy?.modesKept).toBe(fallback.entropy?.modesKept);
    }
  });
});
