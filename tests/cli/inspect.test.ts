import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../server/cli/main';
import { seededUniform, sprinkle } from '../../server/engine/sprinkle';

// `tacet inspect` (issue 16): the order's counts and the dimension estimators from a file of any dimension.
const dir = mkdtempSync(join(tmpdir(), 'tacet-inspect-'));

async function cli(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await runCli(argv, { stdout: (t) => (out += t), stderr: (t) => (err += t), progress: false });
  return { code, out, err };
}

function csv(name: string, header: string, points: ArrayLike<number>, dimension: number): string {
  const rows = [header];
  for (let i = 0; i < points.length; i += dimension) rows.push(Array.from({ length: dimension }, (_, k) => points[i + k]).join(','));
  const path = join(dir, name);
  writeFileSync(path, rows.join('\n') + '\n');
  return path;
}

/** Related pairs and links by testing every pair and triple (brute force, straight from the definitions). */
function bruteCounts(points: ArrayLike<number>, d: number) {
  const n = points.length / d;
  const prec = (i: number, j: number) => {
    const dt = points[j * d] - points[i * d];
    let s = 0;
    for (let k = 1; k < d; k++) s += (points[j * d + k] - points[i * d + k]) ** 2;
    return dt > 0 && dt * dt > s;
  };
  let relations = 0;
  let links = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (!prec(i, j)) continue;
      relations++;
      let between = false;
      for (let k = 0; k < n && !between; k++) between = prec(i, k) && prec(k, j);
      if (!between) links++;
    }
  }
  return { relations, links };
}

describe('tacet inspect', () => {
  it('prints the issue’s JSON keys for 3D points, with exact counts and a dimension near 3', async () => {
    const uniform = seededUniform('inspect-3d');
    const points: number[] = [];
    while (points.length < 3 * 1500) {
      const [t, x, y] = [2 * uniform() - 1, 2 * uniform() - 1, 2 * uniform() - 1];
      if (Math.abs(t) + Math.hypot(x, y) <= 1) points.push(t, x, y);
    }
    const file = csv('d3.csv', 't,x,y', points, 3);
    const { code, out } = await cli('inspect', '--points', file, '--json');
    expect(code).toBe(0);
    const report = JSON.parse(out);
    expect(Object.keys(report)).toEqual(expect.arrayContaining(['N', 'relations', 'links', 'longestChain', 'orderingFraction', 'dimension']));
    expect(report.dimension).toMatchObject({ myrheimMeyer: { estimate: expect.any(Number), error: expect.any(Number) }, midpoint: { estimate: expect.any(Number) } });
    expect(report).toMatchObject({ N: 1500, ...bruteCounts(points, 3) });
    // Myrheim 1978; Meyer 1988: a 3D diamond's ordering fraction is 8/35, dimension 3
    expect(Math.abs(report.dimension.myrheimMeyer.estimate - 3)).toBeLessThanOrEqual(2 * report.dimension.myrheimMeyer.error);
  });

  it('reads a relation list (a hand-worked chain) and prints text by default', async () => {
    const path = join(dir, 'chain.csv');
    writeFileSync(path, 'i,j\n0,1\n1,2\n2,3\n0,4\n');
    const json = JSON.parse((await cli('inspect', '--relations', path, '--count', '6', '--json')).out);
    // closure: 7 relations, links 0≺1, 1≺2, 2≺3, 0≺4; the chain 0≺1≺2≺3 is the longest
    expect(json).toMatchObject({ N: 6, relations: 7, links: 4, longestChain: 4, orderingFraction: 7 / 15 });
    const text = await cli('inspect', '--relations', path, '--count', '6');
    expect(text.out).toContain('N = 6, relations 7, links 4, longest chain 4');
    expect(text.out).toContain('Myrheim–Meyer dimension');
  });

  it('handles a 2D sprinkling through the light-cone route and a cylinder through images', async () => {
    const flat = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 500, seed: 'inspect-2d', prng: 'arc4' }).points;
    const report = JSON.parse((await cli('inspect', '--points', csv('d2.csv', 't,x', flat, 2), '--json')).out);
    expect(report).toMatchObject({ N: 500, ...bruteCounts(flat, 2) });
    const cylinder = sprinkle({ region: { kind: 'cylinder2d', properTime: 2, circumference: 1.5 }, process: 'fixed', count: 300, seed: 'inspect-cyl', prng: 'arc4' }).points;
    const file = csv('cyl.csv', 't,x', cylinder, 2);
    const wrapped = JSON.parse((await cli('inspect', '--points', file, '--region', 'cylinder2d', '--proper-time', '2', '--circumference', '1.5', '--json')).out);
    const unwrapped = JSON.parse((await cli('inspect', '--points', file, '--json')).out);
    // x periodic: pairs joined the short way round are related too
    expect(wrapped.relations).toBeGreaterThan(unwrapped.relations);
  });

  it('refuses bad input with exit code 2 and one line naming the option', async () => {
    const both = await cli('inspect', '--points', 'a.csv', '--relations', 'b.csv');
    expect(both).toMatchObject({ code: 2 });
    expect(both.err).toContain('exactly one of --points FILE and --relations FILE');
    const path = join(dir, 'chain2.csv');
    writeFileSync(path, '0,1\n');
    expect((await cli('inspect', '--relations', path)).err).toContain('--relations needs --count N');
    expect((await cli('inspect', '--relations', path, '--count', '2', '--max-gap', '2.5')).err).toContain('--max-gap must be a whole number');
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'x,t\n0,1\n');
    expect((await cli('inspect', '--points', bad)).err).toContain('header must start with t');
    const help = await cli('inspect', '--help');
    expect(help.out).toContain('tacet inspect');
    expect(help.out).not.toContain('tacet mutual-information');
  });
});
