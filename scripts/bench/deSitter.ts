/**
 * Benchmark of the de Sitter pipeline against the flat one at the same N (issue 16): rows
 * `{ task: 'de-sitter', engine, N, region, flatRegion, seconds, flatSeconds, ratio, target, met, … }`.
 * The target: within 1.5× the flat pipeline's time.
 * - structured engine, N = 20 000: the Poincaré diamond (η from −2 to −1) against the flat 2D diamond,
 *   truncation √N/(4π) with double truncation and a sub-diamond's entropy;
 * - dense engine, N = 2000: the global slab (conformal time −1 to 1, θ periodic) against the cylinder
 *   diamond, both with images in x, truncation √N/(4π).
 * Each in a fresh child process (BENCH_MAX_N limits the sizes); each run is timed twice, alternating
 * with the flat one, and the faster kept (the machine is shared), wall and CPU seconds.
 *
 * Run alone with `npx tsx scripts/bench/deSitter.ts`, or through `npm run bench`.
 */
import { fileURLToPath } from 'node:url';
import type { RegionSpec } from '@shared/vacuum';
import { benchSizes, cpuSeconds, machineFacts, runBenchChild, runBenchScript } from '../benchChild';

export interface DeSitterBenchRow {
  task: 'de-sitter';
  engine: 'structured' | 'dense';
  N: number;
  region: RegionSpec['kind'];
  flatRegion: RegionSpec['kind'];
  seconds: number;
  flatSeconds: number;
  cpuSeconds: number;
  flatCpuSeconds: number;
  ratio: number;
  target: '< 1.5';
  met: boolean;
  peakRssMB: number;
  load: number;
  cores: number;
}

const thisFile = fileURLToPath(import.meta.url);
const TARGET = 1.5;
const REPEATS = 2;
const CASES = {
  20_000: {
    engine: 'structured' as const,
    curved: { kind: 'deSitterDiamond2d', etaPast: -2, etaFuture: -1 } as RegionSpec,
    flat: { kind: 'diamond2d', properTime: 2 } as RegionSpec,
  },
  2000: {
    engine: 'dense' as const,
    curved: { kind: 'deSitterSlab2d', conformalTimeMin: -1, conformalTimeMax: 1 } as RegionSpec,
    flat: { kind: 'cylinder2d', properTime: 2, circumference: 4 } as RegionSpec,
  },
};

async function childRows(n: number): Promise<DeSitterBenchRow[]> {
  const { computeVacuum } = await import('../../server/engine/index');
  const { regionDefaultSubDiamond } = await import('@shared/regions');
  const setup = CASES[n as keyof typeof CASES];
  if (!setup) throw new Error(`no de Sitter bench case for N = ${n}`);
  const request = (region: RegionSpec) => {
    const sub = regionDefaultSubDiamond(region);
    return {
      engine: setup.engine,
      source: { kind: 'sprinkling' as const, sprinkling: { region, count: n, seed: `bench-ds-${n}` } },
      truncation: { rule: 'sqrtN' as const },
      ...(setup.engine === 'structured' ? { doubleTruncation: true, subregion: { kind: 'diamond' as const, past: sub.past, future: sub.future } } : {}),
    };
  };
  const time = async (region: RegionSpec) => {
    const c0 = cpuSeconds();
    const t0 = performance.now();
    await computeVacuum(request(region));
    return { seconds: (performance.now() - t0) / 1000, cpuSeconds: cpuSeconds() - c0 };
  };
  // warm-up: compile the code paths of both regions on a small set
  await computeVacuum({ ...request(setup.curved), source: { kind: 'sprinkling', sprinkling: { region: setup.curved, count: 500, seed: 'warm' } } });
  await computeVacuum({ ...request(setup.flat), source: { kind: 'sprinkling', sprinkling: { region: setup.flat, count: 500, seed: 'warm' } } });
  let curved = { seconds: Infinity, cpuSeconds: Infinity };
  let flat = { seconds: Infinity, cpuSeconds: Infinity };
  for (let k = 0; k < REPEATS; k++) {
    const c = await time(setup.curved);
    const f = await time(setup.flat);
    curved = { seconds: Math.min(curved.seconds, c.seconds), cpuSeconds: Math.min(curved.cpuSeconds, c.cpuSeconds) };
    flat = { seconds: Math.min(flat.seconds, f.seconds), cpuSeconds: Math.min(flat.cpuSeconds, f.cpuSeconds) };
  }
  const ratio = curved.seconds / flat.seconds;
  return [
    {
      task: 'de-sitter',
      engine: setup.engine,
      N: n,
      region: setup.curved.kind,
      flatRegion: setup.flat.kind,
      seconds: curved.seconds,
      flatSeconds: flat.seconds,
      cpuSeconds: curved.cpuSeconds,
      flatCpuSeconds: flat.cpuSeconds,
      ratio,
      target: '< 1.5',
      met: ratio < TARGET,
      ...machineFacts(),
    },
  ];
}

export async function benchRows(): Promise<DeSitterBenchRow[]> {
  const rows: DeSitterBenchRow[] = [];
  for (const n of benchSizes([2000, 20_000])) {
    process.stderr.write(`bench de Sitter: N = ${n}…\n`);
    rows.push(...(await runBenchChild<DeSitterBenchRow>(thisFile, [String(n)], `de Sitter bench child for N = ${n}`)));
  }
  return rows;
}

await runBenchScript(thisFile, childRows, benchRows);
