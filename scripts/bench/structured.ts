/**
 * Benchmark of the structured (large-N) engine on the truncated pipeline: rows
 * `{ task, engine: 'structured', N, seconds, peakRssMB, S }` for N = 4000, 20 000, 100 000
 * (BENCH_MAX_N limits the sizes).
 *
 * Per N: one fixed-N sprinkling of the 2D diamond with tips t = ±√2; tasks in the order a run does them:
 * - sprinkle: the points;
 * - spectrum: the light-cone sweep order and every pair of iΔ above the √N/(4π) cut by Golub–Kahan–Lanczos;
 * - state: the factored truncated SJ state (and its trace);
 * - SSEE: the double-truncated entropy of the half-size diamond (tips t = ±√2/2, about N/4 elements);
 * - pipeline: the sum of the four (S is given on SSEE and pipeline rows, null elsewhere).
 * Beside them, in the same run: numpy's usual dense pipeline on the N = 4000 sprinkling (`engine: 'numpy'`,
 * python3 with numpy: causal matrix, K = ½Cᵀ, the complex Hermitian eigh of iΔ, W cut at √N/(4π), the
 * half diamond's double-truncated S), timed inside python and as a process.
 * Targets, printed on each pipeline row as `target` and `met` (issue 19; issue 9 for N = 4000):
 * N = 4000 within 3 s; N = 100 000 within numpy(4000)'s seconds of the same run and 2 GiB peak;
 * N = 250 000 within 10 minutes and 8 GiB. Each N runs in a fresh child process so peakRssMB (maxRSS at
 * the end of the task) is that size's own.
 *
 * Run alone with `npx tsx scripts/bench/structured.ts`, or through `npm run bench`.
 */
import { benchSizes, machineFacts, runBenchChild, runBenchScript } from '../benchChild';
import { fileURLToPath } from 'node:url';

export interface StructuredBenchRow {
  task: 'sprinkle' | 'spectrum' | 'state' | 'SSEE' | 'pipeline';
  engine: 'structured' | 'numpy';
  N: number;
  seconds: number;
  peakRssMB: number;
  S: number | null;
  /** CPU seconds of the process (all threads) for the task: the machine is shared, wall time alone misleads */
  cpuSeconds: number;
  /** 1-minute load average at the end of the task, and the core count */
  load: number;
  cores: number;
  /** pairs kept above the cut, block Lanczos steps, Δ products, Krylov dimension, block size (spectrum rows) */
  modesKept?: number;
  steps?: number;
  products?: number;
  dimension?: number;
  blockSize?: number;
  /** wall seconds inside the spectrum task: Δ products, Gram–Schmidt, Ritz eigensolves, vectors */
  parts?: { products: number; orthogonalisation: number; ritz: number; vectors: number };
  /** storage of the Lanczos basis and its bytes at the end (spectrum rows) */
  basisPrecision?: 'float32' | 'float64';
  basisMB?: number;
  /** numpy row: the python process's own wall seconds (start-up and JSON included) */
  processSeconds?: number;
  /** pipeline rows: the target of the issue for this N, and whether the row meets it */
  target?: { seconds: number | null; peakRssMB: number | null; source: string };
  met?: boolean;
}

const thisFile = fileURLToPath(import.meta.url);
const SIZES = [4000, 20_000, 100_000, 250_000];
const NUMPY_N = 4000;

/**
 * numpy's usual dense pipeline (the one the engine's tests use as their outside reference, see
 * tests/engine/numpySubregionReference.ts), timed inside python: seconds and CPU seconds of the process
 * for the whole pipeline, and S.
 */
const numpyPipeline = String.raw`
import json, resource, sys, time
import numpy as np
d = json.load(sys.stdin)
start, cpu = time.perf_counter(), time.process_time()
p = np.array(d['points'], dtype=float).reshape(-1, 2)
t, x = p[:, 0], p[:, 1]
N = len(p)
C = (t[None, :] - t[:, None]) > np.abs(x[None, :] - x[:, None])
K = 0.5 * C.T.astype(float)
H = 1j * (K - K.T)
lam, V = np.linalg.eigh(H)
cut = np.sqrt(N) / (4 * np.pi)
keep = lam > cut
both = np.abs(lam) > cut
h = np.sqrt(2) / 2
sub = np.where((t - x > -h) & (t + x > -h) & (t - x < h) & (t + x < h))[0]
n = len(sub)
Vp = V[np.ix_(sub, np.where(keep)[0])]
WO = (Vp * lam[keep]) @ Vp.conj().T
Vk = V[np.ix_(sub, np.where(both)[0])]
HO = (Vk * lam[both]) @ Vk.conj().T
l, U = np.linalg.eigh(HO)
k = np.abs(l) > np.sqrt(n) / (4 * np.pi)
Uk = U[:, k]
mu = np.linalg.eigvals((Uk.conj().T @ WO @ Uk) / l[k][:, None]).real
mu = mu[np.abs(mu) > 1e-300]
S = float(np.sum(mu * np.log(np.abs(mu))))
print(json.dumps({'seconds': time.perf_counter() - start, 'cpuSeconds': time.process_time() - cpu, 'S': S, 'n': int(n), 'peakRssMB': resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}))
`;

async function numpyRow(): Promise<StructuredBenchRow> {
  const { sprinkle } = await import('../../server/engine/sprinkle');
  const { spawn } = await import('node:child_process');
  const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count: NUMPY_N, seed: `bench-${NUMPY_N}`, prng: 'arc4' });
  const started = performance.now();
  const out = await new Promise<string>((resolve, reject) => {
    const child = spawn('python3', ['-c', numpyPipeline], { stdio: ['pipe', 'pipe', 'inherit'] });
    let text = '';
    child.stdout.on('data', (chunk: Buffer) => (text += chunk.toString()));
    child.on('error', reject);
    child.on('close', (code) => (code === 0 ? resolve(text) : reject(new Error(`numpy pipeline exited with ${code}`))));
    child.stdin.end(JSON.stringify({ points: Array.from(s.points) }));
  });
  const processSeconds = (performance.now() - started) / 1000;
  const r = JSON.parse(out) as { seconds: number; cpuSeconds: number; S: number; peakRssMB: number };
  const { load, cores } = machineFacts();
  return { task: 'pipeline', engine: 'numpy', N: NUMPY_N, seconds: r.seconds, cpuSeconds: r.cpuSeconds, load, cores, peakRssMB: r.peakRssMB, S: r.S, processSeconds };
}

/** The issue's target for a structured pipeline row of this N, given numpy(4000)'s seconds of the same run. */
function targetFor(n: number, numpySeconds: number | null): StructuredBenchRow['target'] | undefined {
  if (n === 4000) return { seconds: 3, peakRssMB: null, source: 'issue 9: N = 4000 within 3 s' };
  if (n === 100_000) return { seconds: numpySeconds, peakRssMB: 2048, source: 'issue 19: at most numpy(4000) of the same run, 2 GiB peak' };
  if (n === 250_000) return { seconds: 600, peakRssMB: 8192, source: 'issue 19: within 10 minutes and 8 GiB' };
  return undefined;
}


async function childRows(n: number): Promise<StructuredBenchRow[]> {
  const { sprinkle } = await import('../../server/engine/sprinkle');
  const { subregionElements } = await import('../../server/engine/entropy');
  const { sqrtNCutoff } = await import('../../server/engine/truncation');
  const { pauliJordan2DFromPoints } = await import('../../server/engine/structured/dominance2d');
  const { topSkewPairs } = await import('../../server/engine/structured/lanczos');
  const { factoredState, factoredTrace } = await import('../../server/engine/structured/factoredState');
  const { factoredEntropy } = await import('../../server/engine/structured/factoredEntropy');
  const { availableParallelism, loadavg } = await import('node:os');
  const rows: StructuredBenchRow[] = [];
  let total = 0;
  let totalCpu = 0;
  const cpuNow = () => {
    const u = process.cpuUsage();
    return (u.user + u.system) / 1e6;
  };
  const machine = () => ({ load: Math.round(loadavg()[0] * 100) / 100, cores: availableParallelism() });
  const timed = <T>(task: StructuredBenchRow['task'], work: () => T, extra: (value: T) => Partial<StructuredBenchRow> = () => ({})): T => {
    const start = performance.now();
    const cpuStart = cpuNow();
    const value = work();
    const seconds = (performance.now() - start) / 1000;
    const cpuSeconds = cpuNow() - cpuStart;
    total += seconds;
    totalCpu += cpuSeconds;
    rows.push({ task, engine: 'structured', N: n, seconds, cpuSeconds, ...machine(), peakRssMB: process.resourceUsage().maxRSS / 1024, S: null, ...extra(value) });
    return value;
  };
  const s = timed('sprinkle', () =>
    sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count: n, seed: `bench-${n}`, prng: 'arc4' }),
  );
  const cut = sqrtNCutoff(n);
  let lastReport = performance.now();
  const pairs = timed(
    'spectrum',
    () =>
      topSkewPairs(pauliJordan2DFromPoints(s.points), {
        cut,
        expectedPairs: 2 * Math.sqrt(n),
        onProgress: (p) => {
          if (performance.now() - lastReport < 10_000) return;
          lastReport = performance.now();
          process.stderr.write(`bench structured N = ${n}: Krylov dimension ${p.dimension}, ${p.converged}/${p.wanted} pairs converged\n`);
        },
      }),
    (p) => ({
      modesKept: p.sigma.length,
      steps: p.steps,
      products: p.products,
      dimension: p.dimension,
      blockSize: p.blockSize,
      parts: p.seconds,
      basisPrecision: p.basisPrecision,
      basisMB: Math.round(p.basisBytes / 2 ** 20),
    }),
  );
  const state = timed('state', () => {
    const state = factoredState(pairs, cut);
    factoredTrace(state);
    return state;
  });
  const entropy = timed(
    'SSEE',
    () => {
      const half = Math.SQRT2 / 2;
      const elements = subregionElements({ kind: 'diamond', past: { t: -half, x: 0 }, future: { t: half, x: 0 } }, s.points, 2);
      return factoredEntropy(state, elements, { doubleTruncation: true });
    },
    (e) => ({ S: e.S }),
  );
  rows.push({ task: 'pipeline', engine: 'structured', N: n, seconds: total, cpuSeconds: totalCpu, ...machine(), peakRssMB: process.resourceUsage().maxRSS / 1024, S: entropy.S });
  return rows;
}

function runChild(n: number): Promise<StructuredBenchRow[]> {
  return runBenchChild<StructuredBenchRow>(thisFile, [String(n)], `structured bench child for N = ${n}`);
}

export async function benchRows(): Promise<StructuredBenchRow[]> {
  const rows: StructuredBenchRow[] = [];
  const sizes = benchSizes(SIZES);
  let numpySeconds: number | null = null;
  if (sizes.some((n) => n >= NUMPY_N)) {
    process.stderr.write(`bench structured: numpy's dense pipeline at N = ${NUMPY_N}…\n`);
    const row = await numpyRow();
    numpySeconds = row.seconds;
    rows.push(row);
  }
  for (const n of sizes) {
    process.stderr.write(`bench structured: N = ${n}…\n`);
    for (const row of await runChild(n)) {
      const target = row.task === 'pipeline' ? targetFor(n, numpySeconds) : undefined;
      if (target) {
        row.target = target;
        row.met = (target.seconds === null || row.seconds <= target.seconds) && (target.peakRssMB === null || row.peakRssMB <= target.peakRssMB);
      }
      rows.push(row);
    }
  }
  return rows;
}

await runBenchScript(thisFile, childRows, benchRows);
