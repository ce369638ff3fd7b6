import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseSubregion } from '@shared/vacuum';
import { readPointsCsv } from '../../server/cli/main';
import { computeVacuum, type VacuumRequest } from '../../server/engine/index';
import { numpySubregionEntropies } from '../engine/numpySubregionReference';

/** the diamond |t| + |x| ≤ √2 these tests' tips were chosen in (the default diamond has proper time 2) */
const WIDE = String(2 * Math.SQRT2);
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
    // the first line records the region (our own `# tacet region` comment, shared/regionProposal.ts), the second is the header
    expect(readFileSync(join(dir, 'a.csv'), 'utf8').split('\n').slice(0, 2)).toEqual(['# tacet region {"kind":"diamond2d","properTime":2}', 't,x']);

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
    expect(readFileSync(join(dir, 'd4.csv'), 'utf8').split('\n').slice(0, 2)).toEqual(['# tacet region {"kind":"diamond4d","properTime":2}', 't,x,y,z']);
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

describe('tacet entropy --renyi/--complement and tacet mutual-information', () => {
  // mi.csv: 200 points in the default diamond2d (tips t = ±√2, width 2√2 at t = 0); A and B are
  // sub-diamonds on t = 0 over x ∈ [−1.2, −0.15] and [0.15, 1.2]: disjoint and spacelike to each other
  const A = 'diamond:-0.525,-0.675:0.525,-0.675';
  const B = 'diamond:-0.525,0.675:0.525,0.675';
  const O = 'diamond:-0.7,0:0.7,0';
  const subregionOf = (text: string) => parseSubregion(text);
  /** The labels strictly between a sub-diamond's tips in the 2D order t' − t > |x' − x|, found here, not by the engine. */
  const elementsOf = (text: string): number[] => {
    const spec = subregionOf(text);
    if (spec.kind !== 'diamond') throw new Error('a sub-diamond is expected');
    const labels: number[] = [];
    for (let i = 0; i < points.length / 2; i++) {
      const [t, x] = [points[2 * i], points[2 * i + 1]];
      if (t - spec.past.t > Math.abs(x - spec.past.x) && spec.future.t - t > Math.abs(spec.future.x - x)) labels.push(i);
    }
    return labels;
  };
  let points: Float64Array;
  const request = (extra: Partial<VacuumRequest>): VacuumRequest => ({
    source: { kind: 'points', points, dimension: 2 },
    truncation: { rule: 'sqrtN' },
    doubleTruncation: true,
    ...extra,
  });

  beforeAll(() => {
    expect(tacet('sprinkle', '--region', 'diamond2d', '--proper-time', WIDE, '--n', '200', '--seed', 'mi', '--out', 'mi.csv').code).toBe(0);
    points = readPointsCsv(join(dir, 'mi.csv')).points;
  }, 60_000);

  it('--renyi adds S_α by order to the JSON, the numbers of computeVacuum on the same file, and prints them', async () => {
    const r = tacet('entropy', '--points', 'mi.csv', '--subregion', O, '--double', '--renyi', '3,0.5,inf,2', '--json');
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    // JSON objects list integer-like keys ("2", "3") first whatever the order of insertion: compare the set
    expect(Object.keys(out.renyi).sort()).toEqual(['0.5', '2', '3', 'inf']);
    const engine = await computeVacuum(request({ subregion: subregionOf(O), renyi: [0.5, 2, 3, 'inf'] }));
    // another process, the same numbers up to rounding (threaded BLAS sums need not be bitwise repeatable)
    const same = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(b));
    expect(same(out.S, engine.entropy!.S), `${out.S} vs ${engine.entropy!.S}`).toBe(true);
    for (const key of Object.keys(out.renyi)) expect(same(out.renyi[key], engine.entropy!.renyi![key]!), key).toBe(true);
    // S_α is non-increasing in α, with S = S_1 between S_0.5 and S_2 (common practice: a property of every Rényi family)
    const chain = [out.renyi['0.5'], out.S, out.renyi['2'], out.renyi['3'], out.renyi.inf];
    for (let k = 1; k < chain.length; k++) expect(chain[k]).toBeLessThanOrEqual(chain[k - 1] + 1e-12);
    expect(chain.at(-1)).toBeGreaterThan(0);

    // numpy on the same file, sharing only the coordinates (tests/engine/numpySubregionReference.ts: its own
    // state, restricted problem and Fock-ladder Rényi sums)
    const [reference] = numpySubregionEntropies({ points, stateCut: out.cutoff, double: true, sets: [elementsOf(O)], orders: [0.5, 2, 3, 'inf'] }).sets;
    expect(reference!.n).toBe(out.n);
    for (const key of Object.keys(out.renyi)) expect(Math.abs(out.renyi[key] / reference!.renyi[key]! - 1), key).toBeLessThan(1e-8);

    const text = tacet('entropy', '--points', 'mi.csv', '--subregion', O, '--double', '--renyi', '2,0.5');
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/^Rényi: S_0\.5 = [\d.]+, S_2 = [\d.]+$/m);
    expect(JSON.parse(tacet('entropy', '--points', 'mi.csv', '--subregion', O, '--json').stdout)).not.toHaveProperty('renyi');
  }, 120_000);

  it('--complement gives the causal complement’s S, n and S_O′ − S_O, in JSON and text', async () => {
    const r = tacet('entropy', '--points', 'mi.csv', '--subregion', O, '--double', '--complement', '--json');
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out.complement).sort()).toEqual(['S', 'difference', 'n']);
    const engine = await computeVacuum(request({ subregion: subregionOf(O), complement: true }));
    expect(Math.abs(out.complement.S - engine.complement!.S)).toBeLessThanOrEqual(1e-12 * Math.max(1, engine.complement!.S));
    expect(out.complement.n).toBe(engine.complement!.n);
    expect(out.complement.difference).toBeCloseTo(out.complement.S - out.S, 12);
    // O′: the elements unrelated to every element of O, so neither in O nor in its causal past or future
    expect(out.complement.n).toBeGreaterThan(1);
    expect(out.complement.n + out.n).toBeLessThan(200);

    const text = tacet('entropy', '--points', 'mi.csv', '--subregion', O, '--double', '--complement');
    expect(text.stdout).toMatch(/^complement O′: S = [\d.]+ for n = \d+ elements; S_O′ − S_O = [−-]?[\d.]+(×10\^-?\d+)?$/m);
  }, 120_000);

  it('mutual-information prints S_A, S_B, S_AB, I, n_A, n_B: I = S_A + S_B − S_AB, symmetric in A and B, each S that of tacet entropy', async () => {
    const r = tacet('mutual-information', '--points', 'mi.csv', '--a', A, '--b', B, '--double', '--json');
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    for (const key of ['S_A', 'S_B', 'S_AB', 'I', 'n_A', 'n_B', 'N', 'engine', 'truncation', 'doubleTruncation', 'restrictedCut', 'rule']) {
      expect(out, key).toHaveProperty(key);
    }
    expect(out).toMatchObject({ N: 200, engine: 'dense', truncation: 'sqrtN', doubleTruncation: true, restrictedCut: 'sqrtN' });
    expect(out.I).toBeCloseTo(out.S_A + out.S_B - out.S_AB, 12);
    expect(out.n_A).toBeGreaterThan(10);
    expect(out.n_B).toBeGreaterThan(10);

    // numpy on the same file (tests/engine/numpySubregionReference.ts), each set at its own restricted cut √n/(4π)
    const [a, b, union] = numpySubregionEntropies({ points, stateCut: out.cutoff, double: true, sets: [elementsOf(A), elementsOf(B), [...elementsOf(A), ...elementsOf(B)]] }).sets;
    expect([out.n_A, out.n_B]).toEqual([a!.n, b!.n]);
    expect(Math.abs(out.S_A / a!.S - 1)).toBeLessThan(1e-8);
    expect(Math.abs(out.S_B / b!.S - 1)).toBeLessThan(1e-8);
    expect(Math.abs(out.S_AB / union!.S - 1)).toBeLessThan(1e-8);
    expect(Math.abs(out.I - (a!.S + b!.S - union!.S))).toBeLessThan(1e-8 * (a!.S + b!.S));

    const engine = await computeVacuum(request({ mutualInformation: { a: subregionOf(A), b: subregionOf(B) } }));
    expect(out.I).toBe(engine.mutualInformation!.I);
    expect(out.S_AB).toBe(engine.mutualInformation!.union.S);

    const swapped = JSON.parse(tacet('mutual-information', '--points', 'mi.csv', '--a', B, '--b', A, '--double', '--json').stdout);
    expect(swapped.S_A).toBe(out.S_B);
    expect(swapped.S_B).toBe(out.S_A);
    expect(swapped.n_A).toBe(out.n_B);
    expect(swapped.I).toBeCloseTo(out.I, 12);

    // the same state and rule as tacet entropy: A's restricted cut is √n_A/(4π) with its own n_A
    const alone = JSON.parse(tacet('entropy', '--points', 'mi.csv', '--subregion', A, '--double', '--json').stdout);
    expect(alone.n).toBe(out.n_A);
    expect(alone.S).toBeCloseTo(out.S_A, 12);

    const text = tacet('mutual-information', '--points', 'mi.csv', '--a', A, '--b', B, '--double');
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/^S_A = [\d.]+ \(n_A = \d+\), S_B = [\d.]+ \(n_B = \d+\), S_AB = [\d.]+ \(n = \d+\)$/m);
    expect(text.stdout).toMatch(/^I\(A:B\) = S_A \+ S_B − S_AB = [−-]?[\d.]+(×10\^-?\d+)? for N = 200 elements \(double-truncated/m);
  }, 120_000);

  it('mutual-information on the structured engine with the region options of tacet entropy', () => {
    expect(tacet('sprinkle', '--region', 'diamond2d', '--proper-time', WIDE, '--n', '1200', '--seed', 'mi-structured', '--out', 'mi1200.csv').code).toBe(0);
    const r = tacet('mutual-information', '--points', 'mi1200.csv', '--region', 'diamond2d', '--proper-time', WIDE, '--a', A, '--b', B, '--double', '--engine', 'structured', '--json');
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out).toMatchObject({ N: 1200, engine: 'structured', density: expect.closeTo(300, 9) });
    expect(out.I).toBeCloseTo(out.S_A + out.S_B - out.S_AB, 12);
  }, 120_000);

  it('refuses a bad pair, a missing --a/--b and a bad α: exit 2, one line naming the option', () => {
    const cases: [string[], RegExp][] = [
      [['mutual-information', '--points', 'mi.csv', '--a', A], /^tacet: mutual-information needs --b /],
      [['mutual-information', '--points', 'mi.csv', '--b', B], /^tacet: mutual-information needs --a /],
      [['mutual-information', '--points', 'mi.csv', '--a', 'box:1', '--b', B], /^tacet: --a: subregion must be/],
      [['mutual-information', '--points', 'mi.csv', '--a', A, '--b', 'diamond:0,0'], /^tacet: --b: subregion must be/],
      [['mutual-information', '--points', 'mi.csv', '--a', 'diamond:-0.5,0:0.5,0', '--b', 'diamond:-0.4,0.1:0.4,0.1'], /^tacet: --(a|b): .*overlap/],
      [['mutual-information', '--points', 'mi.csv', '--a', 'diamond:-1,0:-0.5,0', '--b', 'diamond:0.5,0:1,0'], /^tacet: --(a|b): .*causally related/],
      [['mutual-information', '--points', 'mi.csv', '--a', 'elements:1,2,3', '--b', 'elements:3,4'], /^tacet: --(a|b): A and B (overlap|share)/],
      [['mutual-information', '--points', 'mi.csv', '--a', A, '--b', 'elements:1,2'], /^tacet: --b: .*A and B must both be sub-diamonds or both element lists/],
      [['mutual-information', '--points', 'mi.csv', '--a', A, '--b', B, '--restricted-cut', 'lambda:x'], /^tacet: --restricted-cut: /],
      [['mutual-information', '--points', 'mi.csv', '--a', A, '--b', B, '--subregion', O], /^tacet: Unknown option '--subregion'/],
      [['entropy', '--points', 'mi.csv', '--subregion', O, '--renyi', '1'], /^tacet: --renyi: .*α = 1 is the von Neumann entropy/],
      [['entropy', '--points', 'mi.csv', '--subregion', O, '--renyi=-2'], /^tacet: --renyi: .*must be > 0/],
      [['entropy', '--points', 'mi.csv', '--subregion', O, '--renyi', '0,2'], /^tacet: --renyi: .*must be > 0/],
      // a leading dash reads as an option: node's parser names --renyi and says to write --renyi=-2
      [['entropy', '--points', 'mi.csv', '--subregion', O, '--renyi', '-2'], /^tacet: Option '--renyi' argument is ambiguous/],
      [['entropy', '--points', 'mi.csv', '--subregion', O, '--renyi', '2,2'], /^tacet: --renyi: .*must differ/],
      [['entropy', '--points', 'mi.csv', '--subregion', O, '--renyi', 'two'], /^tacet: --renyi: /],
    ];
    for (const [args, message] of cases) {
      const r = tacet(...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stdout, args.join(' ')).toBe('');
      expect(r.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
      expect(r.stderr, args.join(' ')).toMatch(message);
    }
  }, 240_000);

  it('gives each command its own --help, and tacet --help the overview', () => {
    const usage = (name: string) => new RegExp(`^  tacet ${name} `, 'm');
    const own: Record<string, { has: string[]; lacks: string[] }> = {
      sprinkle: { has: ['--seed', '--prng'], lacks: ['--truncation', '--renyi'] },
      vacuum: { has: ['--truncation', '--engine'], lacks: ['--renyi', '--a SPEC'] },
      entropy: { has: ['--subregion', '--renyi', '--complement', '--restricted-cut'], lacks: ['--a SPEC'] },
      'mutual-information': { has: ['--a SPEC', '--b SPEC', '--double', '--region'], lacks: ['--renyi', '--complement'] },
    };
    for (const [name, { has, lacks }] of Object.entries(own)) {
      const r = tacet(name, '--help');
      expect(r.code, name).toBe(0);
      expect(r.stdout, name).toMatch(usage(name));
      for (const other of Object.keys(own).filter((o) => o !== name)) expect(r.stdout, `${name} --help shows ${other}`).not.toMatch(usage(other));
      for (const text of has) expect(r.stdout, `${name} --help has ${text}`).toContain(text);
      for (const text of lacks) expect(r.stdout, `${name} --help lacks ${text}`).not.toContain(text);
    }
    const overview = tacet('--help');
    for (const name of Object.keys(own)) expect(overview.stdout).toMatch(usage(name));
  }, 120_000);
});
