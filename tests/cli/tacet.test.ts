import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const bin = new URL('../../bin/tacet.mjs', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'tacet-cli-'));

function tacet(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('tacet command line', () => {
  it('sprinkles reproducibly and computes the vacuum and the entropy as JSON', () => {
    const a = tacet('sprinkle', '--region', 'diamond2d', '--n', '150', '--seed', 'cli', '--out', 'a.csv');
    expect(a.code).toBe(0);
    expect(JSON.parse(a.stdout)).toMatchObject({ N: 150, dimension: 2, seed: 'cli', process: 'fixed' });
    tacet('sprinkle', '--region', 'diamond2d', '--n', '150', '--seed', 'cli', '--out', 'b.csv');
    expect(readFileSync(join(dir, 'a.csv'), 'utf8')).toBe(readFileSync(join(dir, 'b.csv'), 'utf8'));
    expect(readFileSync(join(dir, 'a.csv'), 'utf8').split('\n')[0]).toBe('t,x');

    const v = tacet('vacuum', '--points', 'a.csv', '--truncation', 'sqrtN', '--json');
    expect(v.code).toBe(0);
    const vacuum = JSON.parse(v.stdout);
    expect(vacuum.N).toBe(150);
    expect(vacuum.dimension).toBe(2);
    expect(vacuum.eigenvalues).toHaveLength(75);
    for (let k = 1; k < vacuum.eigenvalues.length; k++) expect(vacuum.eigenvalues[k]).toBeLessThanOrEqual(vacuum.eigenvalues[k - 1]);
    expect(vacuum.cutoff).toBeCloseTo(Math.sqrt(150) / (4 * Math.PI), 12); // Sorkin–Yazdi cut, server/engine/README.md §7
    expect(vacuum.modesKept).toBe(vacuum.eigenvalues.filter((l: number) => l > vacuum.cutoff).length);
    expect(vacuum.diagnostics.hermiticityError).toBeLessThan(1e-12);

    const e = tacet('entropy', '--points', 'a.csv', '--subregion', 'diamond:-0.7,0:0.7,0', '--double', '--json');
    expect(e.code).toBe(0);
    const entropy = JSON.parse(e.stdout);
    expect(entropy).toMatchObject({ N: 150, doubleTruncation: true });
    expect(entropy.n).toBeGreaterThan(10);
    expect(entropy.S).toBeGreaterThan(0);
    expect(entropy.modesKept % 2).toBe(0);
  }, 120_000);

  it('runs massive and 4D fields when the region gives the density', () => {
    tacet('sprinkle', '--region', 'diamond4d', '--proper-time', '2', '--n', '120', '--seed', '4d', '--out', 'd4.csv');
    expect(readFileSync(join(dir, 'd4.csv'), 'utf8').split('\n')[0]).toBe('t,x,y,z');
    const r = tacet('vacuum', '--points', 'd4.csv', '--region', 'diamond4d', '--proper-time', '2', '--mass', '1', '--json');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.dimension).toBe(4);
    expect(out.density).toBeCloseTo(120 / ((Math.PI * 16) / 24), 10);
  }, 120_000);

  it('rejects bad input with one line on stderr and exit code 2', () => {
    writeFileSync(join(dir, 'nan.csv'), 't,x\n0,0\nNaN,1\n');
    writeFileSync(join(dir, 'cols.csv'), 't,x\n0,0\n1\n');
    writeFileSync(join(dir, 'dim.csv'), 't,x,y\n0,0,0\n1,0,0\n');
    writeFileSync(join(dir, 'word.csv'), 't,x\n0,zero\n1,0\n');
    const cases = [
      ['vacuum', '--points', 'nan.csv'],
      ['vacuum', '--points', 'cols.csv'],
      ['vacuum', '--points', 'dim.csv'],
      ['vacuum', '--points', 'word.csv'],
      ['vacuum', '--points', 'a.csv', '--frobnicate'],
      ['vacuum', '--points', 'a.csv', '--mass', '2'],
      ['vacuum', '--points', 'd4.csv'],
      ['vacuum', '--points', 'a.csv', '--truncation', 'lambda:oops'],
      ['entropy', '--points', 'a.csv', '--subregion', 'box:1'],
      ['sprinkle', '--region', 'sphere', '--n', '10', '--seed', '1'],
      ['sprinkle', '--region', 'diamond2d', '--n', '10'],
      ['vacuum', '--points', 'missing.csv'],
      ['transmogrify'],
    ];
    for (const args of cases) {
      const r = tacet(...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
      expect(r.stderr).toMatch(/^tacet: /);
    }
  }, 240_000);

  it('refuses a subregion or setting that can never be computed before any work: exit 2, one line naming the option', () => {
    // a.csv: 150 points in the default diamond2d of proper time 2√2 (tips at t = ±√2)
    const cases: [string[], RegExp][] = [
      [['entropy', '--points', 'a.csv', '--subregion', 'elements:0,150'], /^tacet: --subregion: subregion element 150 does not exist: the causal set has 150 elements/],
      [['entropy', '--points', 'a.csv', '--region', 'diamond2d', '--subregion', 'diamond:-2,0:0,0'], /^tacet: --subregion: the past tip \(t = -2, x = 0\) lies outside the diamond2d region/],
      [['entropy', '--points', 'a.csv', '--subregion', 'diamond:0,0:0.001,0'], /^tacet: --subregion: the subregion holds 0 of the 150 elements/],
      [['vacuum', '--points', 'a.csv', '--truncation', 'modes:76'], /^tacet: --truncation: modes:76 .*\(at most 75\)/],
      [['vacuum', '--points', 'a.csv', '--engine', 'structured', '--truncation', 'knee'], /^tacet: --engine: the knee finder/],
    ];
    for (const [args, message] of cases) {
      const r = tacet(...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
      expect(r.stderr, args.join(' ')).toMatch(message);
    }
  }, 120_000);

  it('prints help', () => {
    const r = tacet('--help');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('tacet sprinkle');
  });
});
