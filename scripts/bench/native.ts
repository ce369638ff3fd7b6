/**
 * Benchmark of the dense pipeline on both linear-algebra backends: rows
 * `{ task, engine: 'native' | 'ml-matrix', N, seconds, peakRssMB }`.
 *
 * One fixed-N sprinkling of the 2D diamond with tips t = ±1 per N; the subregion is the half-size
 * diamond (tips t = ±½, about N/4 elements). Tasks, in the order a run does them:
 * - spectrum: causal order, K = ½Cᵀ, Δ, ΔᵀΔ and its full eigendecomposition;
 * - W: the untruncated SJ state and its checks;
 * - ssee-untruncated: S of the subregion from the untruncated state;
 * - ssee-double-truncated: the √N/(4π)-truncated state, its checks and S with double truncation;
 * - dense-pipeline: all of the above (the sum, timed as one).
 * Each (engine, N) runs in a fresh child process so that peakRssMB (the child's maximum resident set
 * so far, sampled at the end of the task) is not inherited from an earlier size. Rows also carry the
 * CPU seconds and the load average, since wall time on a shared machine depends on the other work.
 *
 * Targets (issue 8): native N = 2000 within 2 s and N = 4000 within 15 s for the whole pipeline.
 * ml-matrix is slow (its eigensolver grows as N³ in JavaScript), so it runs only up to
 * TACET_BENCH_ML_MATRIX_MAX_N (default 1000; scripts/bench/dense.ts has more ml-matrix sizes).
 * TACET_BENCH_NATIVE_SIZES overrides "1000,2000,4000"; BENCH_MAX_N drops the larger sizes.
 *
 * Run alone with `npx tsx scripts/bench/native.ts` (prints JSON), or through `npm run bench`.
 */
import { runBenchChild } from '../benchChild';
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
}

const thisFile = fileURLToPath(import.meta.url);

function sizes(variable: string, fallback: number[]): number[] {
  const text = process.env[variable];
  if (!text) return fallback;
  const list = text.split(',').map((s) => Number(s.trim()));
  if (list.some((n) => !Number.isInteger(n) || n < 10)) throw new Error(`${variable} must list integers ≥ 10, got "${text}"`);
  return list;
}

/** The pipeline for one backend and size, in this process; returns one row per task. */
export async function runPipeline(engine: BenchRow['engine'], N: number): Promise<BenchRow[]> {
  const { sprinkle } = await import('../../server/engine/sprinkle');
  const { causalMatrix } = await import('../../server/engine/order');
  const { retardedGreenOperator } = await import('../../server/engine/green');
  const { pauliJordan, pauliJordanSpectrum } = await import('../../server/engine/pauliJordan');
  const { applyTruncation } = await import('../../server/engine/truncation');
  const { sjState } = await import('../../server/engine/sjState');
  const { sjDiagnostics } = await import('../../server/engine/sjDiagnostics');
  const { entanglementEntropy, subregionElements } = await import('../../server/engine/entropy');
  const { getBackend } = await import('../../server/engine/linalg');
  const { sprinklingSpecSchema } = await import('@shared/vacuum');

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

  const sprinkling = sprinkle(
    sprinklingSpecSchema.parse({ region: { kind: 'diamond2d', properTime: 2 }, count: N, seed: `bench-${N}` }),
  );
  const causal = causalMatrix(sprinkling.points, 2);
  const delta = pauliJordan(retardedGreenOperator({ points: sprinkling.points, dimension: 2, causal, mass: 0, backend }));
  const spectrum = pauliJordanSpectrum(delta, { backend });
  record('spectrum');

  const complete = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'none' }), backend);
  sjDiagnostics(complete, spectrum.positive, backend);
  record('W');

  const elements = subregionElements({ kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } }, sprinkling.points, 2);
  const untruncated = entanglementEntropy(complete, elements, { backend });
  record('ssee-untruncated');

  const truncated = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'sqrtN' }), backend);
  sjDiagnostics(truncated, spectrum.positive, backend);
  const doubleTruncated = entanglementEntropy(truncated, elements, { doubleTruncation: true, backend });
  record('ssee-double-truncated');

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

export async function benchRows(): Promise<BenchRow[]> {
  const { backendSelection } = await import('../../server/engine/linalg');
  const rows: BenchRow[] = [];
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
    rows.push(...(await runChild(engine, N)));
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
