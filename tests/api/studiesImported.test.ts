import { createHash } from 'node:crypto';
import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { studyDetailSchema, type StudyDetail } from '@shared/studies';
import { causalMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { bearer, parseCsv, waitUntil } from '../worker/runHelpers';

/**
 * Studies over imported causal sets, through the API, PostgreSQL, Redis and the real worker: the
 * points of our own sprinklings, uploaded as files, must give exactly the entropies of the sprinkled
 * study (the same doubles go through the same engine), and a relation list the numbers of its points.
 */
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;
let stranger: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  researcher = await signUp(ctx.app, { name: 'Noor Abernethy' });
  stranger = await signUp(ctx.app, { name: 'Other Team' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const region = { kind: 'diamond2d', properTime: 2 } as const;
const rules = [{ truncation: { rule: 'none' } }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }];
const counts = [80, 120];
const seeds = ['s-1', 's-2'];

/** 17 significant digits: every float64 reads back as the same number (IEEE 754 §5.12.2). */
function pointsCsv(points: Float64Array): string {
  const rows = ['t,x'];
  for (let i = 0; i < points.length; i += 2) rows.push(`${points[i]!.toPrecision(17)},${points[i + 1]!.toPrecision(17)}`);
  return rows.join('\n') + '\n';
}

/** Every related pair i ≺ j of the points, one `i,j` row each (closed already, as a causal order is). */
function relationCsv(points: Float64Array): string {
  const causal = causalMatrix(points, 2);
  const rows = ['i,j'];
  causal.forEach((i, j) => rows.push(`${i},${j}`));
  return rows.join('\n') + '\n';
}

async function upload(user: SignedUpUser, file: string, fileName: string, fields: Record<string, string>): Promise<string> {
  const req = request(ctx.app).post('/api/causal-sets').set(bearer(user.token));
  for (const [k, v] of Object.entries(fields)) req.field(k, v);
  const res = await req.attach('file', Buffer.from(file), fileName);
  if (res.status !== 201) throw new Error(`upload answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

async function postStudy(body: object): Promise<string> {
  const res = await request(ctx.app).post('/api/studies').set(bearer(researcher.token)).send(body);
  if (res.status !== 202) throw new Error(`POST /api/studies answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

async function finishedStudy(id: string): Promise<StudyDetail> {
  const study = await waitUntil(
    async () => studyDetailSchema.parse((await request(ctx.app).get(`/api/studies/${id}`).set(bearer(researcher.token))).body),
    (s) => ['done', 'failed', 'cancelled'].includes(s.status),
    60_000,
  );
  expect(study.error).toBeNull();
  expect(study.status).toBe('done');
  return study;
}

async function tidyRows(id: string): Promise<Record<string, string>[]> {
  const res = await request(ctx.app).get(`/api/studies/${id}/export?format=csv`).set(bearer(researcher.token));
  expect(res.status).toBe(200);
  const { header, rows } = parseCsv(res.text);
  return rows.map((r) => Object.fromEntries(header.map((h, k) => [h, r[k]!])));
}

const sprinklings = counts.flatMap((N) => seeds.map((seed) => ({ N, seed, points: sprinkle({ region, process: 'fixed', count: N, seed, prng: 'arc4' }).points })));
const setIds = new Map<string, string>();
const checksums = new Map<string, string>();

describe('a study over imported copies of our own sprinklings', () => {
  it('gives the entropies, aggregates and fits of the sprinkled study, and names its sets in the JSON export', async () => {
    // uploaded in the reverse order, so the plan has to sort the sets by N itself
    for (const s of [...sprinklings].reverse()) {
      const csv = pointsCsv(s.points);
      const fileName = `sprinkling-${s.N}-${s.seed}.csv`;
      const id = await upload(researcher, csv, fileName, { name: `N${s.N} ${s.seed}`, kind: 'coordinates', region: JSON.stringify(region) });
      setIds.set(`${s.N}|${s.seed}`, id);
      checksums.set(id, createHash('sha256').update(csv).digest('hex'));
    }
    const subregions = { kind: 'concentric', fractions: [0.5, 0.7] };
    const sprinkledId = await postStudy({ title: 'sprinkled', region, counts, seeds, subregions, rules });
    const importedId = await postStudy({ title: 'imported', source: 'imported', causalSetIds: [...setIds.values()].reverse(), subregions, rules });
    const [sprinkled, imported] = [await finishedStudy(sprinkledId), await finishedStudy(importedId)];

    expect(imported.source).toBe('imported');
    expect(imported.regionKind).toBe('imported');
    expect(imported.counts).toEqual(counts);
    expect(imported.seedCount).toBe(4);
    expect(imported.cells.map((c) => c.N)).toEqual([80, 80, 120, 120]);
    expect(imported.subregions.map((s) => s.key)).toEqual(sprinkled.subregions.map((s) => s.key));

    const sprinkledRows = await tidyRows(sprinkledId);
    const importedRows = await tidyRows(importedId);
    expect(importedRows).toHaveLength(sprinkledRows.length);
    expect(importedRows).toHaveLength(4 * 2 * 2);
    const seedOfSet = new Map([...setIds].map(([key, id]) => [id, key.split('|')[1]!]));
    for (const row of importedRows) {
      const twin = sprinkledRows.find((r) => r.N === row.N && r.seed === seedOfSet.get(row.seed) && r.subregion === row.subregion && r.rule === row.rule)!;
      expect(twin, `${row.N} ${row.seed} ${row.subregion} ${row.rule}`).toBeDefined();
      expect(row.n).toBe(twin.n);
      expect(row.modes_kept).toBe(twin.modes_kept);
      expect(row.state_modes_kept).toBe(twin.state_modes_kept);
      expect(Math.abs(Number(row.S) - Number(twin.S))).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(Number(twin.S))));
    }
    const strip = (a: StudyDetail['aggregates'][number]) => ({ ...a, meanS: Number(a.meanS.toPrecision(12)), sdS: a.sdS === null ? null : Number(a.sdS.toPrecision(8)), seS: a.seS === null ? null : Number(a.seS.toPrecision(8)) });
    expect(imported.aggregates.map(strip)).toEqual(sprinkled.aggregates.map(strip));
    expect(imported.fits.map((f) => [f.rule, f.subregion, f.model, Number(f.slope.toPrecision(9))])).toEqual(
      sprinkled.fits.map((f) => [f.rule, f.subregion, f.model, Number(f.slope.toPrecision(9))]),
    );

    const json = await request(ctx.app).get(`/api/studies/${importedId}/export?format=json`).set(bearer(researcher.token));
    expect(json.status).toBe(200);
    expect(json.body.source).toBe('imported');
    expect(json.body.seeds).toBeNull();
    expect(json.body.causalSets).toHaveLength(4);
    for (const set of json.body.causalSets as { id: string; fileName: string; checksum: string; N: number }[]) {
      expect(set.checksum).toBe(checksums.get(set.id));
      expect(set.fileName).toMatch(new RegExp(`^sprinkling-${set.N}-s-[12]\\.csv$`));
    }
    const methods = await request(ctx.app).get(`/api/studies/${importedId}/export?format=methods`).set(bearer(researcher.token));
    expect(methods.text).toMatch(/4 causal sets generated outside Tacet/);
    expect(methods.text).toContain('sprinkling-80-s-1.csv');
    const latex = await request(ctx.app).get(`/api/studies/${importedId}/export?format=latex`).set(bearer(researcher.token));
    expect(latex.text).toMatch(/4 imported causal sets/);
  });

  it('keeps its numbers when a set is deleted after the study was queued (each cell has its own copy)', async () => {
    const points = sprinkle({ region, process: 'fixed', count: 90, seed: 'copy', prng: 'arc4' }).points;
    const id = await upload(researcher, pointsCsv(points), 'copy.csv', { name: 'to be deleted', kind: 'coordinates', region: JSON.stringify(region) });
    const studyId = await postStudy({ source: 'imported', causalSetIds: [id], subregions: { kind: 'concentric', fractions: [0.6] }, rules: [rules[0]] });
    expect((await request(ctx.app).delete(`/api/causal-sets/${id}`).set(bearer(researcher.token))).status).toBe(204);
    const study = await finishedStudy(studyId);
    expect(study.aggregates).toHaveLength(1);
    expect(study.causalSets[0]!.name).toBe('to be deleted');
  });
});

describe('a study over a relation list', () => {
  it('gives the entropies of element lists that the same points as coordinates give', async () => {
    const points = sprinklings[0]!.points;
    const relationId = await upload(researcher, relationCsv(points), 'relation.csv', { name: 'relation of N80 s-1', kind: 'relations', count: '80', dimension: '2' });
    const coordinatesId = setIds.get('80|s-1')!;
    // sprinkle() lists the elements in its own draw order: the first 30 and a spread-out set
    const subregions = { kind: 'elements', lists: [{ indices: Array.from({ length: 30 }, (_, k) => k) }, { label: 'every third', indices: Array.from({ length: 25 }, (_, k) => 3 * k) }] };
    const fromRelation = await finishedStudy(await postStudy({ source: 'imported', causalSetIds: [relationId], subregions, rules }));
    const fromPoints = await finishedStudy(await postStudy({ source: 'imported', causalSetIds: [coordinatesId], subregions, rules }));
    expect(fromRelation.subregions.map((s) => [s.key, s.label, s.elements?.length])).toEqual([
      ['e1', 'elements 1', 30],
      ['e2', 'every third', 25],
    ]);
    const entropies = (s: StudyDetail) => s.aggregates.map((a) => [a.subregion, a.rule, a.meanN, a.meanS] as [string, string, number, number]);
    const a = entropies(fromRelation);
    const b = entropies(fromPoints);
    expect(a.map((x) => x.slice(0, 3))).toEqual(b.map((x) => x.slice(0, 3)));
    a.forEach((x, k) => expect(Math.abs(x[3] - b[k]![3])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(b[k]![3]))));
  });
});

describe('imported study requests that cannot be computed', () => {
  it('answers 400 with the field and a message that says what is wrong', async () => {
    const post = (body: object, user = researcher) => request(ctx.app).post('/api/studies').set(bearer(user.token)).send(body);
    const relationId = (await request(ctx.app).get('/api/causal-sets').set(bearer(researcher.token))).body.items.find((s: { kind: string }) => s.kind === 'relations').id as string;
    const coordinatesId = setIds.get('80|s-1')!;
    const concentric = { kind: 'concentric', fractions: [0.5] };

    const none = await post({ source: 'imported', causalSetIds: [], subregions: concentric, rules });
    expect(none.status).toBe(400);
    expect(none.body.error.issues[0]).toMatchObject({ path: 'causalSetIds', message: 'pick at least one causal set' });

    const foreign = await post({ source: 'imported', causalSetIds: [coordinatesId], subregions: concentric, rules }, stranger);
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.issues[0].path).toBe('causalSetIds.0');
    expect(foreign.body.error.message).toMatch(/no imported causal set .* exists in this team/);

    const onRelations = await post({ source: 'imported', causalSetIds: [coordinatesId, relationId], subregions: concentric, rules });
    expect(onRelations.status).toBe(422);
    expect(onRelations.body.error.issues[0].path).toBe('subregions.kind');
    expect(onRelations.body.error.message).toMatch(/relation list without coordinates; give the subregions as element lists/);

    const beyond = await post({ source: 'imported', causalSetIds: [relationId], subregions: { kind: 'elements', lists: [{ indices: [0, 1, 80] }] }, rules });
    expect(beyond.status).toBe(422);
    expect(beyond.body.error.issues[0].path).toBe('subregions.lists.0.indices');
    expect(beyond.body.error.message).toMatch(/element 80 does not exist .* 80 elements/);

    const tiny = await post({ source: 'imported', causalSetIds: [coordinatesId], subregions: { kind: 'concentric', fractions: [0.1] }, rules });
    expect(tiny.status).toBe(422);
    expect(tiny.body.error.issues[0].path).toBe('subregions.fractions.0');
    expect(tiny.body.error.message).toMatch(/holds \d element.* of "N80 s-1" \(N = 80\); at least 8/);

    const listsOnSprinkling = await post({ region, counts, seeds, subregions: { kind: 'elements', lists: [{ indices: [0, 1, 2] }] }, rules });
    expect(listsOnSprinkling.status).toBe(400);
    expect(listsOnSprinkling.body.error.message).toMatch(/element lists are for imported causal sets/);

    const mixed = await post({ source: 'imported', causalSetIds: [coordinatesId], counts, subregions: concentric, rules });
    expect(mixed.status).toBe(400);
  });
});
