/**
 * Benchmark of `tacet inspect` (issue 16): one row `{ task: 'inspect', N, seconds, target, met, … }` per
 * N = 10 000, 100 000 (BENCH_MAX_N limits the sizes). The target: 100 000 2D points in under 30 s.
 *
 * Per N, in a fresh child process: a fixed-N sprinkling of the 2D diamond (fixed seed) written as a points
 * CSV, then the command itself (runCli, so the file reading and printing are timed too), from argument
 * parsing to the printed JSON (server/engine/README.md §16 describes the light-cone route it takes).
 *
 * Run alone with `npx tsx scripts/bench/inspect.ts`, or through `npm run bench`.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { benchSizes, cpuSeconds, machineFacts, runBenchChild, runBenchScript } from '../benchChild';

export interface InspectBenchRow {
  task: 'inspect';
  N: number;
  seconds: number;
  /** CPU seconds of the same command: the machine is shared, wall time alone misleads */
  cpuSeconds: number;
  target: '< 30 s at N = 100 000';
  /** null below N = 100 000, where the target does not apply */
  met: boolean | null;
  myrheimMeyer: { estimate: number | null; error: number | null };
  midpoint: number | null;
  links: number;
  peakRssMB: number;
  load: number;
  cores: number;
}

const thisFile = fileURLToPath(import.meta.url);
const SIZES = [10_000, 100_000];
const TARGET_SECONDS = 30;

async function childRows(n: number): Promise<InspectBenchRow[]> {
  const { sprinkle } = await import('../../server/engine/sprinkle');
  const { runCli } = await import('../../server/cli/main');
  const { points } = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: n, seed: `bench-inspect-${n}`, prng: 'arc4' });
  const dir = mkdtempSync(join(tmpdir(), 'tacet-bench-inspect-'));
  const file = join(dir, 'points.csv');
  const rows = ['t,x'];
  for (let i = 0; i < points.length; i += 2) rows.push(`${points[i]},${points[i + 1]}`);
  writeFileSync(file, rows.join('\n') + '\n');
  let out = '';
  const cpuStart = cpuSeconds();
  const start = performance.now();
  const code = await runCli(['inspect', '--points', file, '--json'], { stdout: (t) => (out += t), stderr: (t) => process.stderr.write(t), progress: false });
  const seconds = (performance.now() - start) / 1000;
  const cpu = cpuSeconds() - cpuStart;
  rmSync(dir, { recursive: true, force: true });
  if (code !== 0) throw new Error(`tacet inspect exited with ${code} at N = ${n}`);
  const report = JSON.parse(out);
  return [
    {
      task: 'inspect',
      N: n,
      seconds,
      cpuSeconds: cpu,
      target: '< 30 s at N = 100 000',
      met: n === 100_000 ? seconds < TARGET_SECONDS : null,
      myrheimMeyer: report.dimension.myrheimMeyer,
      midpoint: report.dimension.midpoint.estimate,
      links: report.links,
      ...machineFacts(),
    },
  ];
}

export async function benchRows(): Promise<InspectBenchRow[]> {
  const rows: InspectBenchRow[] = [];
  for (const n of benchSizes(SIZES)) {
    process.stderr.write(`bench inspect: N = ${n}…\n`);
    rows.push(...(await runBenchChild<InspectBenchRow>(thisFile, [String(n)], `inspect bench child for N = ${n}`)));
  }
  return rows;
}

await runBenchScript(thisFile, childRows, benchRows);
