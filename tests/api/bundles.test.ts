import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bundleFileCountHeader, bundleManifestSchema, type BundleManifest } from '@shared/bundles';
import { reproduceBundle } from '../../server/cli/reproduce';
import { subregionElements } from '../../server/engine/entropy';
import { causalMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';
import { coordinatesCsv } from '../../server/exports/bundle/files';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import { runPython } from '../support/python';
import { bearer, diamondRun, parseCsv, postRun, waitForRun, waitUntil } from '../worker/runHelpers';

/** Supplementary bundles (issue 17 §1) through the API, PostgreSQL, Redis and the real worker. */
let ctx: TestContext;
let worker: Worker | null = null;
let researcher: SignedUpUser;
let stranger: SignedUpUser;
let queuedRunId: string;
let studyId: string;
let runId: string;
const scratch = mkdtempSync(join(tmpdir(), 'tacet-bundles-'));

const centre = { kind: 'diamond', past: { t: -0.4, x: 0 }, future: { t: 0.4, x: 0 } } as const;
const left = { kind: 'diamond', past: { t: -0.3, x: -0.5 }, future: { t: 0.3, x: -0.5 } } as const;
const right = { kind: 'diamond', past: { t: -0.3, x: 0.5 }, future: { t: 0.3, x: 0.5 } } as const;

beforeAll(async () => {
  ctx = await createTestContext();
  researcher = await signUp(ctx.app, { name: 'Ilse Marchetti' });
  stranger = await signUp(ctx.app, { name: 'Other Team' });
  // queued before any worker runs, so it stays queued for the not-done refusal
  queuedRunId = await postRun(ctx.app, researcher.token, diamondRun({ title: 'still queued' }));
  const study = await request(ctx.app)
    .post('/api/studies')
    .set(bearer(researcher.token))
    .send({
      title: 'bundle study',
      process: 'poisson',
      counts: [150],
      seeds: ['b-1', 'b-2'],
      subregions: { kind: 'concentric', fractions: [0.5] },
      rules: [{ truncation: { rule: 'none' } }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
      mass: 0.5,
    });
  expect(study.status, JSON.stringify(study.body)).toBe(202);
  studyId = study.body.id;
  runId = await postRun(ctx.app, researcher.token, diamondRun({ title: 'bundled run', subregion: centre, doubleTruncation: true, mutualInformation: { a: left, b: right } }, { count: 200, seed: 'bundle' }));
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
  rmSync(scratch, { recursive: true, force: true });
});

/** The answer's bytes (supertest buffers a zip only when told to). */
function binary(res: request.Test): request.Test {
  return res.buffer(true).parse((response, done) => {
    const chunks: Buffer[] = [];
    response.on('data', (c: Buffer) => chunks.push(c));
    response.on('end', () => done(null, Buffer.concat(chunks)));
  });
}

/**
 * The zip read by python's zipfile with each entry's SHA-256 from hashlib (a reference reader outside
 * this project's code), with manifest.json's text.
 */
function readWithPython(zipPath: string): { names: string[]; sha256: Record<string, string>; manifest: string; pointRows: Record<string, number>; svgRoots: string[]; pdfHeads: string[] } {
  return runPython(
    `
import hashlib, json, sys, zipfile
import xml.etree.ElementTree as ET
path = json.load(sys.stdin)
out = {"names": [], "sha256": {}, "manifest": "", "pointRows": {}, "svgRoots": [], "pdfHeads": []}
with zipfile.ZipFile(path) as z:
    assert z.testzip() is None
    for info in z.infolist():
        data = z.read(info.filename)
        out["names"].append(info.filename)
        out["sha256"][info.filename] = hashlib.sha256(data).hexdigest()
        if info.filename == "manifest.json":
            out["manifest"] = data.decode("utf-8")
        if info.filename.startswith("points/"):
            out["pointRows"][info.filename] = len(data.decode("utf-8").strip().split("\\n")) - 1
        if info.filename.endswith(".svg"):
            out["svgRoots"].append(ET.fromstring(data).tag)
        if info.filename.endswith(".pdf"):
            out["pdfHeads"].append(data[:5].decode("latin-1"))
print(json.dumps(out))
`,
    zipPath,
  );
}

function checkHashes(read: ReturnType<typeof readWithPython>): BundleManifest {
  const manifest = bundleManifestSchema.parse(JSON.parse(read.manifest));
  const listed = Object.keys(manifest.files).sort();
  expect(read.names.filter((n) => n !== 'manifest.json').sort()).toEqual(listed);
  for (const path of listed) expect(read.sha256[path], path).toBe(manifest.files[path]);
  expect(read.names[read.names.length - 1]).toBe('manifest.json');
  expect(read.svgRoots.every((tag) => tag === '{http://www.w3.org/2000/svg}svg')).toBe(true);
  expect(read.pdfHeads.every((head) => head === '%PDF-')).toBe(true);
  return manifest;
}

describe('supplementary bundles', () => {
  it('refuses a run that is not done with 409 naming it, before the worker has taken it', async () => {
    const res = await request(ctx.app).post('/api/bundles').set(bearer(researcher.token)).send({ runIds: [queuedRunId] });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain(queuedRunId.slice(0, 8));
    expect(res.body.error.message).toMatch(/queued/);
  });

  it('streams a study bundle whose files python reads and hashes as the manifest says', async () => {
    worker = await startTestWorker(ctx);
    await waitUntil(
      async () => (await request(ctx.app).get(`/api/studies/${studyId}`).set(bearer(researcher.token))).body.status as string,
      (status) => status === 'done',
      60_000,
    );
    await waitForRun(ctx.app, researcher.token, runId, (run) => run.status === 'done');

    const res = await binary(request(ctx.app).get(`/api/studies/${studyId}/bundle`).set(bearer(researcher.token)));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/zip');
    expect(res.headers['content-disposition']).toContain(`tacet-study-${studyId.slice(0, 8)}-bundle.zip`);
    const zipPath = join(scratch, 'study.zip');
    writeFileSync(zipPath, res.body as Buffer);

    const read = readWithPython(zipPath);
    expect(read.names.length).toBe(Number(res.headers[bundleFileCountHeader]));
    const manifest = checkHashes(read);
    for (const path of ['README.md', 'tables/entropies.csv', 'tables/aggregates.csv', 'tables/entropies.tex', 'provenance.json', 'methods.txt', 'references.bib', 'figures/entropy-scaling.svg', 'figures/entropy-scaling.pdf', 'figures/spectra.svg', 'figures/spectra.pdf']) {
      expect(read.names, path).toContain(path);
    }
    expect(manifest.kind).toBe('study');
    expect(manifest.engineVersion).toMatch(/^tacet-engine /);
    // 2 sprinklings × 1 sub-diamond × 2 rules
    expect(manifest.entropies).toHaveLength(4);

    // the manifest's S are the study's own: the tidy CSV export of the same study
    const csv = parseCsv((await request(ctx.app).get(`/api/studies/${studyId}/export?format=csv`).set(bearer(researcher.token))).text);
    const column = (name: string) => csv.header.indexOf(name);
    for (const e of manifest.entropies) {
      const row = csv.rows.find((r) => r[column('seed')] === e.seed && r[column('rule')] === e.ruleKey);
      expect(row, `${e.seed} ${e.ruleKey}`).toBeDefined();
      expect(Number(row![column('S')])).toBe(e.S);
      // each points file holds the N the cell was computed on (a Poisson N, so drawn again from the seed)
      expect(read.pointRows[e.points]).toBe(e.N);
      expect(e).toMatchObject({ mass: 0.5, region: { kind: 'diamond2d' }, subregionKey: 'l/L=0.5' });
      expect(e.subregion).toHaveProperty('past');
      expect(e.density).not.toBeNull();
    }

    // computed again from the bundle alone, every S agrees with the stored one
    const report = await reproduceBundle(zipPath, { json: true }, { stdout: () => undefined, stderr: () => undefined, progress: false });
    expect(report).toMatchObject({ checked: 4, ok: true });
    expect(report.maxRelDiff).toBeLessThan(1e-9);
  }, 120_000);

  it('streams a bundle of chosen runs with the subregion and the pair as entries', async () => {
    const res = await binary(request(ctx.app).post('/api/bundles').set(bearer(researcher.token)).send({ runIds: [runId] }));
    expect(res.status).toBe(200);
    const zipPath = join(scratch, 'runs.zip');
    writeFileSync(zipPath, res.body as Buffer);
    const read = readWithPython(zipPath);
    expect(read.names.length).toBe(Number(res.headers[bundleFileCountHeader]));
    const manifest = checkHashes(read);
    const name = `run-${runId.slice(0, 8)}`;
    for (const path of [`points/${name}.csv`, `spectra/${name}.csv`, `spectra/${name}.json`, 'tables/entropies.csv', 'tables/entropies.tex', 'methods.txt', 'references.bib', 'figures/spectra.pdf']) {
      expect(read.names, path).toContain(path);
    }
    const run = (await request(ctx.app).get(`/api/runs/${runId}`).set(bearer(researcher.token))).body;
    expect(manifest.entropies.map((e) => e.S)).toEqual([run.result.entropy.S, run.result.mutualInformation.union.S]);
    expect(manifest.entropies[1]!.pair).toEqual({ SA: run.result.mutualInformation.a.S, SB: run.result.mutualInformation.b.S, I: run.result.mutualInformation.I });
    expect(read.pointRows[`points/${name}.csv`]).toBe(200);

    const report = await reproduceBundle(zipPath, { json: true }, { stdout: () => undefined, stderr: () => undefined, progress: false });
    // S of the subregion; S_{A∪B}, S_A and S_B of the pair
    expect(report).toMatchObject({ checked: 4, ok: true });
  }, 60_000);

  it('bundles imported causal sets: a relation list as its i,j rows and a coordinates file as points, both computed again', async () => {
    const drawn = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 110, seed: 'imported-bundle', prng: 'arc4' });
    const rows = ['i,j'];
    causalMatrix(drawn.points, 2).forEach((i, j) => rows.push(`${i},${j}`));
    const upload = async (file: string, fileName: string, fields: Record<string, string>) => {
      const req = request(ctx.app).post('/api/causal-sets').set(bearer(researcher.token));
      for (const [k, v] of Object.entries(fields)) req.field(k, v);
      const res = await req.attach('file', Buffer.from(file), fileName);
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      return res.body.id as string;
    };
    const relationsId = await upload(rows.join('\n') + '\n', 'order.csv', { name: 'order only', kind: 'relations', count: '110', dimension: '2' });
    const coordinatesId = await upload(coordinatesCsv(drawn.points, 2), 'points.csv', { name: 'with coordinates', kind: 'coordinates', region: JSON.stringify({ kind: 'diamond2d', properTime: 2 }) });
    const indices = Array.from(subregionElements({ kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } }, drawn.points, 2));
    const posted = await request(ctx.app)
      .post('/api/studies')
      .set(bearer(researcher.token))
      .send({ title: 'imported bundle', source: 'imported', causalSetIds: [relationsId, coordinatesId], subregions: { kind: 'elements', lists: [{ label: 'centre', indices }] }, rules: [{ truncation: { rule: 'sqrtN' }, doubleTruncation: true }] });
    expect(posted.status, JSON.stringify(posted.body)).toBe(202);
    const relationRun = await postRun(ctx.app, researcher.token, { causalSetId: relationsId, truncation: { rule: 'sqrtN' }, subregion: { kind: 'elements', indices }, doubleTruncation: true });
    await waitUntil(async () => (await request(ctx.app).get(`/api/studies/${posted.body.id}`).set(bearer(researcher.token))).body.status as string, (status) => status === 'done', 60_000);
    await waitForRun(ctx.app, researcher.token, relationRun, (run) => run.status === 'done');

    const studyZip = join(scratch, 'imported.zip');
    writeFileSync(studyZip, (await binary(request(ctx.app).get(`/api/studies/${posted.body.id}/bundle`).set(bearer(researcher.token)))).body as Buffer);
    const manifest = checkHashes(readWithPython(studyZip));
    expect(manifest.entropies.map((e) => [e.format, e.seed, e.subregion])).toEqual([
      ['relations', null, { elements: indices }],
      ['coordinates', null, { elements: indices }],
    ]);
    expect(manifest.entropies[0]!.points).toMatch(/^relations\/cell-001_N-110_order_only\.csv$/);
    // the same elements, by their order alone or with their coordinates, give the same S
    expect(manifest.entropies[0]!.S).toBeCloseTo(manifest.entropies[1]!.S, 9);
    const quiet = { stdout: () => undefined, stderr: () => undefined, progress: false };
    await expect(reproduceBundle(studyZip, { json: true }, quiet)).resolves.toMatchObject({ checked: 2, ok: true });

    const runZip = join(scratch, 'relation-run.zip');
    writeFileSync(runZip, (await binary(request(ctx.app).post('/api/bundles').set(bearer(researcher.token)).send({ runIds: [relationRun, runId] }))).body as Buffer);
    const runManifest = checkHashes(readWithPython(runZip));
    expect(runManifest.entropies.map((e) => e.points)).toEqual([`relations/run-${relationRun.slice(0, 8)}.csv`, `points/run-${runId.slice(0, 8)}.csv`, `points/run-${runId.slice(0, 8)}.csv`]);
    expect(runManifest.entropies[0]!.S).toBeCloseTo(manifest.entropies[0]!.S, 9);
    await expect(reproduceBundle(runZip, { json: true }, quiet)).resolves.toMatchObject({ checked: 5, ok: true });
  }, 120_000);

  it("answers 404 for another team's study and runs, without telling them apart from missing ones", async () => {
    const study = await request(ctx.app).get(`/api/studies/${studyId}/bundle`).set(bearer(stranger.token));
    expect(study.status).toBe(404);
    const missing = await request(ctx.app).get(`/api/studies/00000000-0000-4000-8000-000000000000/bundle`).set(bearer(stranger.token));
    expect(missing.status).toBe(404);
    expect(study.body.error.message).toBe(missing.body.error.message);
    const runs = await request(ctx.app).post('/api/bundles').set(bearer(stranger.token)).send({ runIds: [runId] });
    expect(runs.status).toBe(404);
    expect(runs.body.error.message).toBe(`No run ${runId} exists in this team.`);
  });

  it('answers 400 with the field for a bad body', async () => {
    const post = (body: unknown) => request(ctx.app).post('/api/bundles').set(bearer(researcher.token)).send(body as object);
    for (const body of [{}, { runIds: [] }, { runIds: ['not-an-id'] }, { runIds: [runId, runId] }, { runIds: [runId], extra: 1 }]) {
      const res = await post(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.message.length).toBeGreaterThan(0);
    }
    const tooMany = await post({ runIds: Array.from({ length: 101 }, (_, k) => `00000000-0000-4000-8000-${String(k).padStart(12, '0')}`) });
    expect(tooMany.status).toBe(400);
    expect(JSON.stringify(tooMany.body.error)).toMatch(/at most 100 runs/);
  });
});
