import { spawnSync } from 'node:child_process';
import { createWriteStream, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { finished } from 'node:stream/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { reproduceReportSchema, type BundleEntropy } from '@shared/bundles';
import { studyRuleKey, studyRuleSchema } from '@shared/studies';
import { sprinklingSpecSchema } from '@shared/vacuum';
import { computeVacuum, ENGINE_VERSION } from '../../server/engine/index';
import { sprinkle } from '../../server/engine/sprinkle';
import { BundleWriter } from '../../server/exports/bundle/writer';
import { coordinatesCsv } from '../../server/exports/bundle/files';
import { computeStudyCell } from '../../server/studies/cell';
import { resolveSubregions } from '../../server/studies/plan';
import { runPython } from '../support/python';

/**
 * `tacet reproduce` on a bundle written by the server's own BundleWriter, whose S are those of the
 * study-cell engine path (server/studies/cell.ts) that stores a study's entropies: recomputing them
 * from the bundle's points through `computeVacuum` must give the stored S (that is the check). The
 * altered bundles are rewritten by python's zipfile, a reader and writer outside this project.
 */
const bin = new URL('../../bin/tacet.mjs', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'tacet-reproduce-'));
const good = join(dir, 'good.zip');
const region = { kind: 'diamond2d', properTime: 2 } as const;
const rules = [studyRuleSchema.parse({ truncation: { rule: 'none' } }), studyRuleSchema.parse({ truncation: { rule: 'sqrtN' }, doubleTruncation: true })];
let storedS: number[] = [];

function tacet(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Copies the zip entry by entry with python's zipfile, changing what `edit` names. */
function rewrite(target: string, edit: { alterByteOf?: string; drop?: string; scaleS?: number }) {
  runPython(
    `
import json, sys, zipfile
a = json.load(sys.stdin)
with zipfile.ZipFile(a["source"]) as src, zipfile.ZipFile(a["target"], "w", zipfile.ZIP_DEFLATED) as out:
    for info in src.infolist():
        data = src.read(info.filename)
        if info.filename == a.get("drop"):
            continue
        if info.filename == a.get("alterByteOf"):
            k = data.index(b"\\n") + 3
            data = data[:k] + (b"7" if data[k:k+1] != b"7" else b"3") + data[k+1:]
        if info.filename == "manifest.json" and a.get("scaleS"):
            m = json.loads(data)
            m["entropies"][0]["S"] *= a["scaleS"]
            data = json.dumps(m).encode()
        out.writestr(info.filename, data)
print("null")
`,
    { source: good, target, ...edit },
  );
}

beforeAll(async () => {
  const sprinkling = { region, process: 'fixed' as const, count: 220, seed: 'reproduce-cli', prng: 'arc4' as const };
  const subregions = resolveSubregions({ region, subregions: { kind: 'concentric', fractions: [0.5, 0.7] } });
  const cell = await computeStudyCell({ sprinkling, mass: 0, subregions, rules });
  const drawn = sprinkle(sprinklingSpecSchema.parse(sprinkling));
  const output = createWriteStream(good);
  const writer = new BundleWriter(output);
  const path = 'points/cell-001_N-220_seed-reproduce-cli.csv';
  await writer.add('README.md', 'a test bundle\n');
  await writer.add(path, coordinatesCsv(drawn.points, 2));
  const entropies: BundleEntropy[] = cell.entropies.map((e) => {
    const s = subregions.find((x) => x.key === e.subregion)!;
    const rule = rules.find((r) => studyRuleKey(r) === e.rule)!;
    return {
      source: { kind: 'study-cell', id: 'test' },
      points: path,
      format: 'coordinates',
      dimension: 2,
      seed: 'reproduce-cli',
      N: cell.N,
      region,
      density: cell.density,
      mass: 0,
      engine: 'dense',
      ruleKey: e.rule,
      rule: { truncation: rule.truncation, doubleTruncation: rule.doubleTruncation },
      subregion: { past: s.past!, future: s.future! },
      subregionKey: e.subregion,
      n: e.n,
      S: e.S,
    };
  });
  // a run's path as well: the structured engine, which only computeVacuum runs (one entry alone)
  const tips = { past: { t: -0.4, x: 0 }, future: { t: 0.4, x: 0 } };
  const run = await computeVacuum({ source: { kind: 'sprinkling', sprinkling }, truncation: { rule: 'sqrtN' }, subregion: { kind: 'diamond', ...tips }, doubleTruncation: true, engine: 'structured' });
  expect(run.engine).toBe('structured');
  entropies.push({ ...entropies[0]!, source: { kind: 'run', id: 'structured' }, engine: 'structured', ruleKey: 'sqrtN+double', rule: { truncation: { rule: 'sqrtN' }, doubleTruncation: true }, subregion: tips, subregionKey: 'run', n: run.entropy!.n, S: run.entropy!.S });
  storedS = entropies.map((e) => e.S);
  await writer.finish({ format: 'tacet-bundle/1', kind: 'study', ids: ['test'], createdAt: new Date().toISOString(), engineVersion: ENGINE_VERSION, entropies });
  await finished(output);
}, 120_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('tacet reproduce', () => {
  it('computes every entropy of a bundle again and agrees with the stored S (--json)', () => {
    // 2 sub-diamonds × 2 rules through the study-cell path, one structured run alone; none a pure state
    expect(storedS).toHaveLength(5);
    expect(storedS.every((s) => s > 0.01)).toBe(true);
    const r = tacet('reproduce', good, '--json');
    expect(r.stderr).toMatch(/5\/5 entropies/);
    expect(r.code, r.stderr).toBe(0);
    const report = reproduceReportSchema.strict().parse(JSON.parse(r.stdout));
    expect(report).toEqual({ checked: 5, maxRelDiff: report.maxRelDiff, ok: true, mismatches: [] });
    expect(report.maxRelDiff).toBeLessThan(1e-9);
  }, 120_000);

  it('prints one readable line without --json', () => {
    const r = tacet('reproduce', good);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^5 entropies computed again from the bundle's points; largest relative difference \S+ \(tolerance 1e-6 relative \+ 1e-6 absolute\): ok\n$/);
  }, 120_000);

  it('refuses a bundle with one byte of a points file altered, naming the file', () => {
    const altered = join(dir, 'altered.zip');
    rewrite(altered, { alterByteOf: 'points/cell-001_N-220_seed-reproduce-cli.csv' });
    const r = tacet('reproduce', altered, '--json');
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('points/cell-001_N-220_seed-reproduce-cli.csv does not match its SHA-256 in manifest.json');
  });

  it('refuses a bundle that lacks a listed file, and a file that is not a zip', () => {
    const short = join(dir, 'short.zip');
    rewrite(short, { drop: 'README.md' });
    const r = tacet('reproduce', short);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('README.md is listed in manifest.json but missing from the bundle');
    const notZip = tacet('reproduce', bin);
    expect(notZip.code).toBe(1);
    expect(notZip.stderr).toMatch(/is not a readable zip/);
    expect(tacet('reproduce').code).toBe(2);
  });

  it('reports a stored S that its points do not give, and exits 1', () => {
    const lying = join(dir, 'lying.zip');
    rewrite(lying, { scaleS: 1.001 });
    const r = tacet('reproduce', lying, '--json');
    expect(r.code).toBe(1);
    const report = reproduceReportSchema.parse(JSON.parse(r.stdout));
    expect(report.ok).toBe(false);
    expect(report.mismatches).toEqual([{ entry: 0, quantity: 'S', stored: storedS[0]! * 1.001, recomputed: expect.any(Number) }]);
    expect(report.mismatches[0]!.recomputed).toBeCloseTo(storedS[0]!, 9);
    expect(report.maxRelDiff).toBeGreaterThan(9e-4);
  }, 120_000);
});
