import { spawn } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const repositoryRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

/**
 * Runs a bench module again as a fresh child process (`node --import tsx FILE --child ARGS…`) and
 * returns the rows it prints as JSON on its last stdout line. A fresh process per size keeps each
 * peak-RSS figure its own, not inherited from an earlier, larger run.
 */
export function runBenchChild<T>(file: string, args: string[], what: string): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', file, '--child', ...args], {
      cwd: repositoryRoot,
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    let out = '';
    child.stdout.on('data', (chunk: Buffer) => (out += chunk.toString()));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) return reject(new Error(`${what} exited with ${code}`));
      resolve(JSON.parse(out.trim().split('\n').at(-1) as string) as T[]);
    });
  });
}

/**
 * The sizes a bench module runs: its defaults, without those above BENCH_MAX_N when that is set
 * (the quick mode, e.g. BENCH_MAX_N=4000).
 */
export function benchSizes(defaults: readonly number[]): number[] {
  const text = process.env.BENCH_MAX_N;
  if (!text) return [...defaults];
  const max = Number(text);
  if (!Number.isFinite(max) || max < 10) throw new Error(`BENCH_MAX_N must be a number ≥ 10, got "${text}"`);
  return defaults.filter((n) => n <= max);
}

/**
 * What a bench module does when run as a script: as a child (`--child N`) it prints its rows for that N
 * on one line; alone it prints `{ rows }` of all its sizes.
 */
export async function runBenchScript<T>(file: string, childRows: (n: number) => Promise<T[]>, benchRows: () => Promise<T[]>): Promise<void> {
  if (process.argv[1] !== file) return;
  const childIndex = process.argv.indexOf('--child');
  if (childIndex >= 0) process.stdout.write(JSON.stringify(await childRows(Number(process.argv[childIndex + 1]))));
  else process.stdout.write(JSON.stringify({ rows: await benchRows() }, null, 2) + '\n');
}

/** CPU seconds (all threads) this process has used so far: the machine is shared, wall time alone misleads. */
export function cpuSeconds(): number {
  const used = process.cpuUsage();
  return (used.user + used.system) / 1e6;
}

/** What every row reports of the machine at its end: peak RSS of this child, 1-minute load, cores. */
export function machineFacts(): { peakRssMB: number; load: number; cores: number } {
  return { peakRssMB: process.resourceUsage().maxRSS / 1024, load: Math.round(loadavg()[0] * 100) / 100, cores: availableParallelism() };
}
