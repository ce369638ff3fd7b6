/**
 * Benchmark of the dense pipeline on both linear-algebra backends: rows
 * `{ task, engine: 'native' | 'ml-matrix', N, seconds, peakRssMB }`.
 *
 * One fixed-N sprinkling of the 2D diamond with tips t = ±1 per N; the subregion is the half-size
 * diamond (tips t = ±½, about N/4 elements). Tasks, in the order a run does them:
 * - spectrum: causal order, K = ½Cᵀ, Δ and its whole spectrum with vectors (native: Δ's normal form,
 *   pauliJordanSpectrum's skew route; ml-matrix: the eigendecomposition of ΔᵀΔ);
 * - W: the untruncated SJ state and its checks;
 * - ssee-untruncated: S of the subregion from the untruncated state;
 * - ssee-double-truncated: the √N/(4π)-truncated state, its checks and S with double truncation;
 * - dense-pipeline: all of the above (the sum, timed as one).
 * Each (engine, N) runs in a fresh child process so that peakRssMB (the child's maximum resident set
 * so far, sampled at the end of the task) is not inherited from an earlier size. Rows also carry the
 * CPU seconds and the load average, since wall time on a shared machine depends on the other work.
 *
 * Targets (issue 8): native N = 2000 within 2 s and N = 4000 within 15 s for the whole pipeline.
 * Target (issue 19): dense untruncated N = 2000 — spectrum, W with its checks and the untruncated S
 * (the first three tasks) — at least 4 times as fast as numpy doing the same on the same points, in
 * the same run: row `{ task: 'dense-untruncated-vs-numpy', seconds, numpySeconds, ratio, target: 4,
 * met }`, with both S and their difference (they must agree to 1e-6). numpy (Debian's /usr/bin/python3,
 * its OpenBLAS on every core) takes the direct complex route, as the engine tests' references do:
 * eigh of the Hermitian iΔ, W its positive part, the same checks formed from W (Hermiticity,
 * W − W̄ − iΔ, W W̄, tr W, V†V − I; W's eigenvalues are the kept ones by construction), and S from the
 * complex generalized problem on the subregion (server/engine/README.md §5, §9). Its time is measured
 * inside python (no start-up, no JSON), right after the engine's child; TACET_BENCH_NUMPY_SIZES
 * overrides "2000" (native sizes only).
 * ml-matrix is slow (its eigensolver grows as N³ in JavaScript), so it runs only up to
 * TACET_BENCH_ML_MATRIX_MAX_N (default 1000; scripts/bench/dense.ts has more ml-matrix sizes).
 * TACET_BENCH_NATIVE_SIZES overrides "1000,2000,4000"; BENCH_MAX_N drops the larger sizes.
 *
 * Run alone with `npx tsx scripts/bench/native.ts` (prints JSON), or through `npm run bench`.
 */
import { runBenchChild } from '../benchChild';
import { execFileSync } from 'node:child_process';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export interface BenchRow {
  task: 'spectrum' | 'W' | 'ssee-untruncated' | 'ssee-double-truncated' | 'dense-pipeline';
  engine: 'native' | 'ml-matrix';
  N: number;
  seconds: number;
  peakRssMB: number;
  /** CPU time of the process over the task (all threads): with a busy machine wall time ≫ this */
  cpuSeconds: number;
  /** 1-minute load average when the task ended, against `cores` */
  loadAverage: number;
  cores: number;
  /** S of the subregion (ssee rows only) */
  S?: number;
}

/** The issue-19 comparison: the engine's untruncated dense run (spectrum + W + S) against numpy's, same points, same run. */
export interface NumpyComparisonRow {
  task: 'dense-untruncated-vs-numpy';
  engine: 'native';
  N: number;
  /** the engine: spectrum + W (with its checks) + ssee-untruncated */
  seconds: number;
  numpySeconds: number;
  numpyStages: { spectrum: number; state: number; entropy: number };
  /** CPU seconds (all threads) of the engine's three tasks and of numpy's run: how much each got of the cores */
  cpuSeconds: number;
  numpyCpuSeconds: number;
  /** numpySeconds / seconds */
  ratio: number;
  target: 4;
  met: boolean;
  S: number;
  numpyS: number;
  /** |S − numpyS| / max(1, |numpyS|): must stay below 1e-6 */
  entropyDifference: number;
  loadAverage: number;
  cores: number;
}

const thisFile = fileURLToPath(import.meta.url);

function sizes(variable: string, fallback: number[]): number[] {
  const text = process.env[variable];
  if (!text) return fallback;
  const list = text.split(',').map((s) => Number(s.trim()));
  if (list.some((n) => !Number.isInteger(n) || n < 10)) throw new Error(`${variable} must list integers ≥ 10, got "${text}"`);
  return list;
}

/** The points of size N (2D diamond with tips t = ±1, seed `bench-N`) and the half-size sub-diamond's elements. */
async function benchInput(N: number) {
  const { sprinkle } = await import('../../server/engine/sprinkle');
  const { subregionElements } = await import('../../server/engine/entropy');
  const { sprinklingSpecSchema } = await import('@shared/vacuum');
  const sprinkling = sprinkle(
    sprinklingSpecSchema.parse({ region: { kind: 'diamond2d', properTime: 2 }, count: N, seed: `bench-${N}` }),
  );
  const elements = subregionElements({ kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } }, sprinkling.points, 2);
  return { sprinkling, elements };
}

/**
 * numpy's untruncated run on the same points (the route of the module note), timed inside python.
 * C[i][j] = 1 when i ≺ j (t_j − t_i > |x_j − x_i|, server/engine/README.md §1), K = ½Cᵀ, Δ = K − Kᵀ.
 */
const numpyScript = String.raw`
import json, sys, time
import numpy as np
d = json.load(sys.stdin)
pts = np.array(d['points']).reshape(-1, 2); t, x = pts[:, 0], pts[:, 1]; N = len(t)
sub = np.array(d['elements'])
start = time.perf_counter(); cpuStart = time.process_time()
C = ((t[None, :] - t[:, None]) > np.abs(x[None, :] - x[:, None])).astype(float)
D = 0.5 * C.T - 0.5 * C
ev, V = np.linalg.eigh(1j * D)
spectrum = time.perf_counter()
pos = ev > 1e-6 * ev.max()
W = (V[:, pos] * ev[pos]) @ V[:, pos].conj().T
normW = np.linalg.norm(W)
checks = {
    'hermiticity': float(np.linalg.norm(W - W.conj().T) / normW),
    'commutator': float(np.linalg.norm(W - W.conj() - 1j * D) / np.linalg.norm(D)),
    'orthogonality': float(np.linalg.norm(W @ W.conj()) / normW ** 2),
    'trace': float(np.trace(W).real), 'positiveSum': float(ev[pos].sum()),
    'orthonormality': float(np.linalg.norm(V.conj().T @ V - np.eye(N))),
}
state = time.perf_counter()
Wo = W[np.ix_(sub, sub)]; Ao = 1j * D[np.ix_(sub, sub)]
e, U = np.linalg.eigh(Ao)
keep = np.abs(e) > 1e-6 * np.abs(e).max(); U = U[:, keep]
mu = np.linalg.eigvals(np.diag(1 / e[keep]) @ U.conj().T @ Wo @ U).real
S = float(np.sum(mu * np.log(np.abs(mu))))
end = time.perf_counter()
print(json.dumps({'S': S, 'checks': checks, 'spectrum': spectrum - start, 'state': state - spectrum, 'entropy': end - state, 'cpu': time.process_time() - cpuStart}))
`;

interface NumpyRun {
  S: number;
  spectrum: number;
  state: number;
  entropy: number;
  cpu: number;
}

async function numpyRun(N: number): Promise<NumpyRun> {
  const { sprinkling, elements } = await benchInput(N);
  const input = JSON.stringify({ points: Array.from(sprinkling.points), elements: Array.from(elements) });
  const out = execFileSync('/usr/bin/python3', ['-c', numpyScript], { input, encoding: 'utf8', maxBuffer: 16 * 2 ** 20 });
  return JSON.parse(out) as NumpyRun;
}

function numpyComparison(N: number, engineRows: BenchRow[], numpy: NumpyRun): NumpyComparisonRow {
  const untruncatedTasks: BenchRow['task'][] = ['spectrum', 'W', 'ssee-untruncated'];
  const picked = engineRows.filter((r) => untruncatedTasks.includes(r.task));
  const seconds = Number(picked.reduce((sum, r) => sum + r.seconds, 0).toFixed(3));
  const numpySeconds = Number((numpy.spectrum + numpy.state + numpy.entropy).toFixed(3));
  const S = picked.find((r) => r.task === 'ssee-untruncated')?.S as number;
  const ratio = Number((numpySeconds / seconds).toFixed(2));
  return {
    task: 'dense-untruncated-vs-numpy',
    engine: 'native',
    N,
    seconds,
    numpySeconds,
    numpyStages: { spectrum: Number(numpy.spectrum.toFixed(3)), state: Number(numpy.state.toFixed(3)), entropy: Number(numpy.entropy.toFixed(3)) },
    cpuSeconds: Number(picked.reduce((sum, r) => sum + r.cpuSeconds, 0).toFixed(3)),
    numpyCpuSeconds: Number(numpy.cpu.toFixed(3)),
    ratio,
    target: 4,
    met: ratio >= 4,
    S,
    numpyS: numpy.S,
    entropyDifference: Math.abs(S - numpy.S) / Math.max(1, Math.abs(numpy.S)),
    loadAverage: Number(os.loadavg()[0].toFixed(2)),
    cores: os.availableParallelism(),
  };
}

/** The pipeline for one backend and size, in this process; returns one row per task. */
export async function runPipeline(engine: BenchRow['engine'], N: number): Promise<BenchRow[]> {
  const { causalMatrix } = await import('../../server/engine/order');
  const { retardedGreenOperator } = await import('../../server/engine/green');
  const { pauliJordan, pauliJordanSpectrum } = await import('../../server/engine/pauliJordan');
  const { applyTruncation } = await import('../../server/engine/truncation');
  const { sjState } = await import('../../server/engine/sjState');
  const { sjDiagnostics } = await import('../../server/engine/sjDiagnostics');
  const { entanglementEntropy } = await import('../../server/engine/entropy');
  const { getBackend } = await import('../../server/engine/linalg');

  const backend = getBackend(engine);
  const rows: BenchRow[] = [];
  const peakRssMB = () => Math.round(process.resourceUsage().maxRSS / 1024);
  const cores = os.availableParallelism();
  const cpuSince = (since: NodeJS.CpuUsage) => {
    const used = process.cpuUsage(since);
    return Number(((used.user + used.system) / 1e6).toFixed(3));
  };
  const row = (task: BenchRow['task'], from: number, cpuFrom: NodeJS.CpuUsage): BenchRow => ({
    task,
    engine,
    N,
    seconds: Number(((performance.now() - from) / 1000).toFixed(3)),
    peakRssMB: peakRssMB(),
    cpuSeconds: cpuSince(cpuFrom),
    loadAverage: Number(os.loadavg()[0].toFixed(2)),
    cores,
  });
  const begin = performance.now();
  const cpuBegin = process.cpuUsage();
  let start = begin;
  let cpuStart = cpuBegin;
  const record = (task: BenchRow['task']) => {
    rows.push(row(task, start, cpuStart));
    start = performance.now();
    cpuStart = process.cpuUsage();
  };

  const { sprinkling, elements } = await benchInput(N);
  const causal = causalMatrix(sprinkling.points, 2);
  const delta = pauliJordan(retardedGreenOperator({ points: sprinkling.points, dimension: 2, causal, mass: 0, backend }));
  const spectrum = pauliJordanSpectrum(delta, { backend });
  record('spectrum');

  const complete = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'none' }), backend);
  sjDiagnostics(complete, spectrum.positive, backend);
  record('W');

  const untruncated = entanglementEntropy(complete, elements, { backend });
  record('ssee-untruncated');
  rows[rows.length - 1].S = untruncated.S;

  const truncated = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'sqrtN' }), backend);
  sjDiagnostics(truncated, spectrum.positive, backend);
  const doubleTruncated = entanglementEntropy(truncated, elements, { doubleTruncation: true, backend });
  record('ssee-double-truncated');
  rows[rows.length - 1].S = doubleTruncated.S;

  if (!Number.isFinite(untruncated.S) || !Number.isFinite(doubleTruncated.S)) {
    throw new Error(`non-finite entropy at N = ${N} on ${engine}`);
  }
  rows.push(row('dense-pipeline', begin, cpuBegin));
  return rows;
}

/**
 * Waits (at most 3 minutes) until other processes leave every core free, as the thread policy of the
 * native backend measures it (`OtherProcessesLoad`): a child started while the previous one's
 * processes wind down would otherwise run on one thread. The rows record the load average they saw.
 */
async function quietMachine(): Promise<void> {
  const { OtherProcessesLoad, threadsForLoad } = await import('../../server/engine/linalg/nativeBackend');
  const cores = os.availableParallelism();
  const load = new OtherProcessesLoad(undefined, undefined, undefined, 0.5);
  const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));
  const deadline = Date.now() + 180_000;
  await sleep(600);
  let busy = load.read() ?? 0;
  if (threadsForLoad(busy, cores) === cores) return;
  console.error(`[bench native] waiting for other processes (${busy.toFixed(2)} cores busy) to leave all ${cores} cores free …`);
  while (threadsForLoad(busy, cores) < cores && Date.now() < deadline) {
    await sleep(1000);
    busy = load.read() ?? busy;
  }
}

function runChild(engine: BenchRow['engine'], N: number): Promise<BenchRow[]> {
  return runBenchChild<BenchRow>(thisFile, [engine, String(N)], `bench child (${engine}, N = ${N})`);
}

export async function benchRows(): Promise<(BenchRow | NumpyComparisonRow)[]> {
  const { backendSelection } = await import('../../server/engine/linalg');
  const rows: (BenchRow | NumpyComparisonRow)[] = [];
  const numpySizes = sizes('TACET_BENCH_NUMPY_SIZES', [2000]);
  const plan: [BenchRow['engine'], number][] = [];
  const mlMax = Number(process.env.TACET_BENCH_ML_MATRIX_MAX_N ?? 1000);
  const maxN = process.env.BENCH_MAX_N ? Number(process.env.BENCH_MAX_N) : Infinity;
  if (!(maxN >= 10)) throw new Error(`BENCH_MAX_N must be a number ≥ 10, got "${process.env.BENCH_MAX_N}"`);
  const nativeSizes = sizes('TACET_BENCH_NATIVE_SIZES', [1000, 2000, 4000]).filter((n) => n <= maxN);
  // force the probe of the native addon past TACET_LINALG: this bench compares both backends
  const saved = process.env.TACET_LINALG;
  delete process.env.TACET_LINALG;
  const selection = backendSelection();
  if (saved !== undefined) process.env.TACET_LINALG = saved;
  if (selection.name === 'native') for (const N of nativeSizes) plan.push(['native', N]);
  else console.error(`[bench native] native backend unavailable (${selection.nativeUnavailableReason}); ml-matrix rows only`);
  for (const N of nativeSizes) if (N <= mlMax) plan.push(['ml-matrix', N]);
  for (const [engine, N] of plan) {
    if (engine === 'native') await quietMachine();
    console.error(`[bench native] ${engine} N = ${N} …`);
    const engineRows = await runChild(engine, N);
    rows.push(...engineRows);
    if (engine === 'native' && numpySizes.includes(N)) {
      console.error(`[bench native] numpy N = ${N} …`);
      rows.push(numpyComparison(N, engineRows, await numpyRun(N)));
    }
  }
  return rows;
}

if (process.argv[1] && path.resolve(process.argv[1]) === thisFile) {
  const [flag, engine, size] = process.argv.slice(2);
  if (flag === '--child') {
    if (engine !== 'native' && engine !== 'ml-matrix') throw new Error(`unknown engine ${engine}`);
    console.log(JSON.stringify(await runPipeline(engine, Number(size))));
  } else {
    console.log(JSON.stringify(await benchRows(), null, 2));
  }
}
