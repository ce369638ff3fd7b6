/**
 * Benchmark of the pure-TypeScript dense pipeline on the ml-matrix backend: rows
 * `{ task, engine: 'ml-matrix', N, seconds, peakRssMB }` for N = 500, 1000, 2000 (BENCH_MAX_N limits
 * the sizes, e.g. BENCH_MAX_N=1000).
 *
 * Per N: one fixed-N sprinkling of the 2D diamond with tips t = ±√2; tasks in the order a run does them:
 * - sprinkle: the points;
 * - spectrum: causal order, K = ½Cᵀ, Δ, ΔᵀΔ and its full eigendecomposition;
 * - W: the untruncated SJ state with all its checks;
 * - SSEE: the untruncated entropy of the half-size diamond (tips t = ±√2/2, about N/4 elements).
 * Each N runs in a fresh child process so peakRssMB (process.resourceUsage().maxRSS after the task) is
 * that size's own peak, not one inherited from an earlier size.
 *
 * Run alone with `npx tsx scripts/bench/dense.ts`, or through `npm run bench`.
 */
import { benchSizes, runBenchChild, runBenchScript } from '../benchChild';
import { fileURLToPath } from 'node:url';

export interface DenseBenchRow {
  task: 'sprinkle' | 'spectrum' | 'W' | 'SSEE';
  engine: 'ml-matrix';
  N: number;
  seconds: number;
  peakRssMB: number;
}

const thisFile = fileURLToPath(import.meta.url);
const SIZES = [500, 1000, 2000];


async function childRows(n: number): Promise<DenseBenchRow[]> {
  const { sprinkle } = await import('../../server/engine/sprinkle');
  const { causalMatrix } = await import('../../server/engine/order');
  const { retardedGreen } = await import('../../server/engine/green');
  const { pauliJordan, pauliJordanSpectrum } = await import('../../server/engine/pauliJordan');
  const { applyTruncation } = await import('../../server/engine/truncation');
  const { sjDiagnostics } = await import('../../server/engine/sjDiagnostics');
  const { sjState } = await import('../../server/engine/sjState');
  const { entanglementEntropy, subregionElements } = await import('../../server/engine/entropy');
  const { getBackend } = await import('../../server/engine/linalg');
  const backend = getBackend('ml-matrix');
  const rows: DenseBenchRow[] = [];
  const timed = <T>(task: DenseBenchRow['task'], work: () => T): T => {
    const start = performance.now();
    const value = work();
    rows.push({ task, engine: 'ml-matrix', N: n, seconds: (performance.now() - start) / 1000, peakRssMB: process.resourceUsage().maxRSS / 1024 });
    return value;
  };
  const s = timed('sprinkle', () =>
    sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count: n, seed: `bench-${n}`, prng: 'arc4' }),
  );
  const { delta, spectrum } = timed('spectrum', () => {
    const causal = causalMatrix(s.points, 2);
    const delta = pauliJordan(retardedGreen({ points: s.points, dimension: 2, causal, backend }));
    return { delta, spectrum: pauliJordanSpectrum(delta, { backend }) };
  });
  const state = timed('W', () => {
    const state = sjState(delta, spectrum, applyTruncation(spectrum.positive, n, { rule: 'none' }), backend);
    sjDiagnostics(state, spectrum.positive, backend);
    return state;
  });
  timed('SSEE', () => {
    const half = Math.SQRT2 / 2;
    const elements = subregionElements({ kind: 'diamond', past: { t: -half, x: 0 }, future: { t: half, x: 0 } }, s.points, 2);
    return entanglementEntropy(state, elements, { backend });
  });
  return rows;
}

function runChild(n: number): Promise<DenseBenchRow[]> {
  return runBenchChild<DenseBenchRow>(thisFile, [String(n)], `dense bench child for N = ${n}`);
}

export async function benchRows(): Promise<DenseBenchRow[]> {
  const rows: DenseBenchRow[] = [];
  for (const n of benchSizes(SIZES)) {
    process.stderr.write(`bench dense: N = ${n}…\n`);
    rows.push(...(await runChild(n)));
  }
  return rows;
}

await runBenchScript(thisFile, childRows, benchRows);
