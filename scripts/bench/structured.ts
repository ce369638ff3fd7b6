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
 * Targets (issue 9): N = 4000 within 3 s; N = 100 000 within 10 minutes and 4 GiB peak on 2 cores.
 * Each N runs in a fresh child process so peakRssMB (maxRSS at the end of the task) is that size's own.
 *
 * Run alone with `npx tsx scripts/bench/structured.ts`, or through `npm run bench`.
 */
import { benchSizes, runBenchChild, runBenchScript } from '../benchChild';
import { fileURLToPath } from 'node:url';

export interface StructuredBenchRow {
  task: 'sprinkle' | 'spectrum' | 'state' | 'SSEE' | 'pipeline';
  engine: 'structured';
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
}

const thisFile = fileURLToPath(import.meta.url);
const SIZES = [4000, 20_000, 100_000];


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
    (p) => ({ modesKept: p.sigma.length, steps: p.steps, products: p.products, dimension: p.dimension, blockSize: p.blockSize, parts: p.seconds }),
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
  for (const n of benchSizes(SIZES)) {
    process.stderr.write(`bench structured: N = ${n}…\n`);
    rows.push(...(await runChild(n)));
  }
  return rows;
}

await runBenchScript(thisFile, childRows, benchRows);
