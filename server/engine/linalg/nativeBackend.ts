/**
 * The native dense backend: a thin N-API addon (native/src/addon.cc) bound to Debian's OpenBLAS and
 * the LAPACK it carries, built by `npm run build:native` (postinstall runs it and never fails the install).
 *
 * Routines, all on column-major Float64Array storage read in place (see backend.ts):
 * - symmetricEigen: for the whole spectrum, LAPACK's dsytrd + dstedc (divide and conquer) with the
 *   eigenvectors assembled by 128-reflector blocks (dlarft + dlarfb; dsyevd's own dormtr uses blocks
 *   of 32 and was 0.2–0.3 s slower at N = 2000); eigenvalues only by dsyevd, or dsyevd_2stage from
 *   N = 3500 (its band reduction is BLAS3); dsyevr for the range `above` a cut (eigenvalues in
 *   (above, Gershgorin bound]). Lower triangle read.
 * - multiply: BLAS dgemm, C = op(A) op(B).
 * - gram: BLAS dsyrk, C = AᵀA (half the flops of a general product), mirrored to both triangles.
 * - solveTriangular: BLAS dtrsm, T X = B or Tᵀ X = B by substitution.
 * - cholesky: LAPACK dpotrf, A = L Lᵀ (null when A is not positive definite).
 * - skewSpectrum: an antisymmetric A of even order reduced to antisymmetric tridiagonal form by our own
 *   blocked Householder reduction, whose odd/even halves are one bidiagonal matrix (dbdsdc), with the
 *   same blocked back-transformation; no Gram product, and each σ to about ε‖A‖ (addon.cc SkewSpectrum).
 *
 * Threads: OpenBLAS splits every call over all cores, and its threads wait for each other at every
 * step of the tridiagonal reduction; when other processes keep the cores busy that costs far more than
 * it gains (dsyevd at N = 2000: 1.4 s on one thread against 5.0 s on two, on a 2-core machine with a
 * load average of 8). So by default (TACET_BLAS_THREADS=auto) each large call runs on the cores other
 * processes leave free — the machine's busy CPU time less this process's own since the previous call
 * (`OtherProcessesLoad`, `threadsForLoad`), at least one. TACET_BLAS_THREADS=<n> or
 * OPENBLAS_NUM_THREADS fixes the count.
 *
 * When the addon is missing or does not load (no compiler, no OpenBLAS at build or run time), this
 * module yields no backend and the reason, and the engine serves from ml-matrix instead.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type {
  DenseMatrix,
  LinearAlgebraBackend,
  SymmetricEigenOptions,
  SymmetricEigenResult,
  TriangularSolveOptions,
} from './backend';

/** The functions exported by native/src/addon.cc; each argument list is documented there. */
interface TacetLinalgAddon {
  symmetricEigen(
    n: number,
    a: Float64Array,
    vectors: boolean,
    above?: number,
    algorithm?: 'auto' | 'tridiagonal' | 'dsyevd' | 'dsyevr',
    overwrite?: boolean,
  ): { values: Float64Array; vectors: Float64Array | null };
  multiply(m: number, n: number, k: number, a: Float64Array, transA: boolean, b: Float64Array, transB: boolean): Float64Array;
  gram(rows: number, cols: number, a: Float64Array): Float64Array;
  solveTriangular(
    n: number,
    t: Float64Array,
    nrhs: number,
    b: Float64Array,
    lower: boolean,
    unitDiagonal: boolean,
    transpose: boolean,
  ): Float64Array;
  cholesky(n: number, a: Float64Array): Float64Array | null;
  skewSpectrum(n: number, a: Float64Array, overwrite: boolean): { sigma: Float64Array; vectors: Float64Array };
  info(): { blasConfig: string; threads: number };
  setThreads(threads: number): number;
}

export interface NativeLoadResult {
  backend: LinearAlgebraBackend | null;
  /** why the backend is null; null when it loaded */
  reason: string | null;
  /** the BLAS build the addon is linked to, e.g. "OpenBLAS 0.3.21 …", when it loaded */
  blasConfig: string | null;
  /** OpenBLAS worker threads (all cores unless OPENBLAS_NUM_THREADS says otherwise), when it loaded */
  blasThreads: number | null;
  addonPath: string;
  /** every export of the addon when it loaded, for the structured engine's own kernels (native/src/structured.cc) */
  exports?: Readonly<Record<string, unknown>>;
}

const repositoryRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', '..');

/** Where `npm run build:native` puts the addon; TACET_NATIVE_ADDON overrides it. */
export const defaultAddonPath =
  process.env.TACET_NATIVE_ADDON ?? path.join(repositoryRoot, 'native', 'build', 'Release', 'tacet_linalg.node');

function checkData(name: string, m: DenseMatrix): void {
  if (!(m.data instanceof Float64Array)) throw new TypeError(`${name}: data must be a Float64Array`);
  if (m.data.length !== m.rows * m.cols) {
    throw new RangeError(`${name}: ${m.rows}×${m.cols} matrix needs ${m.rows * m.cols} entries, has ${m.data.length}`);
  }
}

/** Calls below this many multiply–adds are too short for the thread count to matter. */
const THREAD_POLICY_MIN_WORK = 256 ** 3;

/** CPU seconds, all threads, of this process. */
const processCpuSeconds = () => {
  const used = process.cpuUsage();
  return (used.user + used.system) / 1e6;
};

/** Busy CPU seconds of the whole machine (every process, nice included), summed over cores. */
const machineBusySeconds = () => {
  let ms = 0;
  for (const { times } of os.cpus()) ms += times.user + times.nice + times.sys + times.irq;
  return ms / 1000;
};

/**
 * How many cores other processes kept busy lately: the machine's busy CPU time less this process's
 * own, over the time since the previous reading (at least `minimumWindow` seconds, else the previous
 * estimate stands). Unlike the load average this has no minute of lag and does not count this
 * process's own threads.
 */
export class OtherProcessesLoad {
  private lastTime: number;
  private lastBusy: number;
  private lastOwn: number;
  private estimate: number | null = null;

  constructor(
    private readonly clock: () => number = () => performance.now() / 1000,
    private readonly machineBusy: () => number = machineBusySeconds,
    private readonly ownCpu: () => number = processCpuSeconds,
    private readonly minimumWindow = 0.1,
  ) {
    this.lastTime = clock();
    this.lastBusy = machineBusy();
    this.lastOwn = ownCpu();
  }

  /** Cores busy with other processes since the previous reading; null until a window has passed. */
  read(): number | null {
    const now = this.clock();
    const elapsed = now - this.lastTime;
    if (elapsed < this.minimumWindow) return this.estimate;
    const busy = this.machineBusy();
    const own = this.ownCpu();
    this.estimate = Math.max(0, (busy - this.lastBusy - (own - this.lastOwn)) / elapsed);
    this.lastTime = now;
    this.lastBusy = busy;
    this.lastOwn = own;
    return this.estimate;
  }
}

/**
 * OpenBLAS threads for the next large call: the cores other processes leave free, at least one.
 * Sharing a core costs far more than it gains (dsyevd at N = 2000 beside one busy process on 2 cores:
 * 6.0 s on two threads, 2.1 s on one), so a core counts as taken from half a core's use up.
 */
export function threadsForLoad(otherBusyCores: number, cores: number): number {
  return Math.max(1, Math.min(cores, Math.round(cores - otherBusyCores)));
}

/** Returns the function to call before a large routine (see the module note on threads). */
function threadPolicy(addon: TacetLinalgAddon): (work: number) => void {
  const setting = process.env.TACET_BLAS_THREADS ?? (process.env.OPENBLAS_NUM_THREADS ? 'fixed' : 'auto');
  if (setting === 'fixed') return () => {};
  const cores = Math.max(1, os.availableParallelism());
  if (setting !== 'auto') {
    const fixed = Number(setting);
    if (!Number.isInteger(fixed) || fixed < 1) throw new Error(`TACET_BLAS_THREADS must be auto or a positive integer, got "${setting}"`);
    addon.setThreads(fixed);
    return () => {};
  }
  let current = addon.info().threads;
  const others = new OtherProcessesLoad();
  return (work) => {
    if (work < THREAD_POLICY_MIN_WORK) return;
    // before the first window has passed, the load average stands in (it lags, but errs to one thread)
    const busy = others.read() ?? os.loadavg()[0];
    const wanted = threadsForLoad(busy, cores);
    if (wanted !== current) current = addon.setThreads(wanted);
  };
}

/** Wraps the addon in the LinearAlgebraBackend interface, checking shapes with messages in our terms. */
export function backendFromAddon(addon: TacetLinalgAddon): LinearAlgebraBackend {
  const beforeLargeCall = threadPolicy(addon);
  return {
    name: 'native',

    symmetricEigen(a: DenseMatrix, options: SymmetricEigenOptions = {}): SymmetricEigenResult {
      checkData('symmetricEigen', a);
      if (a.rows !== a.cols) throw new RangeError(`symmetricEigen needs a square matrix, got ${a.rows}×${a.cols}`);
      const wantVectors = options.vectors !== false;
      const n = a.rows;
      beforeLargeCall(n * n * n);
      const r = addon.symmetricEigen(n, a.data, wantVectors, options.above, 'auto', options.overwriteInput === true);
      return {
        values: r.values,
        vectors: wantVectors && r.vectors ? { rows: n, cols: r.values.length, data: r.vectors } : null,
      };
    },

    multiply(a, b, options = {}) {
      checkData('multiply (A)', a);
      checkData('multiply (B)', b);
      const transposeA = options.transposeA === true;
      const transposeB = options.transposeB === true;
      const m = transposeA ? a.cols : a.rows;
      const k = transposeA ? a.rows : a.cols;
      const kb = transposeB ? b.cols : b.rows;
      const n = transposeB ? b.rows : b.cols;
      if (k !== kb) {
        throw new RangeError(
          `cannot multiply ${transposeA ? '(' : ''}${a.rows}×${a.cols}${transposeA ? ')ᵀ' : ''} by ` +
            `${transposeB ? '(' : ''}${b.rows}×${b.cols}${transposeB ? ')ᵀ' : ''}`,
        );
      }
      beforeLargeCall(m * n * k);
      return { rows: m, cols: n, data: addon.multiply(m, n, k, a.data, transposeA, b.data, transposeB) };
    },

    gram(a) {
      checkData('gram', a);
      beforeLargeCall(a.rows * a.cols * a.cols);
      return { rows: a.cols, cols: a.cols, data: addon.gram(a.rows, a.cols, a.data) };
    },

    solveTriangular(t, b, options: TriangularSolveOptions) {
      checkData('solveTriangular (T)', t);
      checkData('solveTriangular (B)', b);
      if (t.rows !== t.cols || b.rows !== t.rows) {
        throw new RangeError(`solveTriangular: T (${t.rows}×${t.cols}) must be square and match B (${b.rows}×${b.cols})`);
      }
      beforeLargeCall(t.rows * t.rows * b.cols);
      const data = addon.solveTriangular(
        t.rows,
        t.data,
        b.cols,
        b.data,
        options.lower,
        options.unitDiagonal === true,
        options.transpose === true,
      );
      return { rows: b.rows, cols: b.cols, data };
    },

    skewSpectrum(a, options = {}) {
      checkData('skewSpectrum', a);
      if (a.rows !== a.cols) throw new RangeError(`skewSpectrum needs a square matrix, got ${a.rows}×${a.cols}`);
      if (a.rows % 2 !== 0) throw new RangeError(`skewSpectrum needs an even order, got ${a.rows}`);
      const n = a.rows;
      beforeLargeCall(n * n * n);
      const r = addon.skewSpectrum(n, a.data, options.overwriteInput === true);
      return { sigma: r.sigma, vectors: { rows: n, cols: n, data: r.vectors } };
    },

    cholesky(a) {
      checkData('cholesky', a);
      if (a.rows !== a.cols) throw new RangeError(`cholesky needs a square matrix, got ${a.rows}×${a.cols}`);
      beforeLargeCall((a.rows * a.rows * a.rows) / 3);
      const data = addon.cholesky(a.rows, a.data);
      return data ? { rows: a.rows, cols: a.rows, data } : null;
    },
  };
}

/** Loads the addon at `addonPath` (uncached); never throws, a failure is described in `reason`. */
export function loadNativeBackend(addonPath: string = defaultAddonPath): NativeLoadResult {
  if (!existsSync(addonPath)) {
    return {
      backend: null,
      reason: `native addon not built (${addonPath} is missing; run npm run build:native)`,
      blasConfig: null,
      blasThreads: null,
      addonPath,
    };
  }
  try {
    const addon = createRequire(import.meta.url)(addonPath) as TacetLinalgAddon;
    const backend = backendFromAddon(addon);
    const { blasConfig, threads } = addon.info();
    return { backend, reason: null, blasConfig, blasThreads: threads, addonPath, exports: addon as unknown as Record<string, unknown> };
  } catch (error) {
    const message = error instanceof Error ? error.message.split('\n')[0] : String(error);
    return { backend: null, reason: `native addon failed to load: ${message}`, blasConfig: null, blasThreads: null, addonPath };
  }
}

let cached: NativeLoadResult | null = null;

/** The native backend from the default location, loaded once per process. */
export function nativeBackendStatus(): NativeLoadResult {
  cached ??= loadNativeBackend();
  return cached;
}
