import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDetailSchema, runOriginOf } from '@shared/runs';
import { studyDetailSchema, studyListResponseSchema, type StudyDetail } from '@shared/studies';
import { insertMembership } from '../../server/db/repositories/teams';
import { studyCellJobId } from '../../server/queue/jobs';
import { sweepOrphanedWork } from '../../server/worker/recovery';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import { bearer, parseCsv, waitUntil } from '../worker/runHelpers';

/**
 * The daily loop of scaling studies through the API, PostgreSQL, Redis and the real worker: a failed
 * cell retried, a study extended by N and seeds, a cell opened as a run, and the list's search and
 * filters.
 */
let ctx: TestContext;
let worker: Worker | null = null;
let researcher: SignedUpUser;
let colleague: SignedUpUser;
let stranger: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  researcher = await signUp(ctx.app, { name: 'Ines Varga' });
  colleague = await signUp(ctx.app, { name: 'Kofi Mensah' });
  await insertMembership(ctx.dataSource.manager, { userId: colleague.id, teamId: researcher.teamId, role: 'researcher' });
  stranger = await signUp(ctx.app, { name: 'Other Team' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const asResearcher = () => ({ ...bearer(researcher.token), 'x-tacet-team': researcher.teamId });
const asColleague = () => ({ ...bearer(colleague.token), 'x-tacet-team': researcher.teamId });
const rules = [{ truncation: { rule: 'none' } }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }];
const study = (overrides: Record<string, unknown> = {}) => ({
  title: 'daily loop',
  counts: [80],
  seeds: ['r-1', 'r-2'],
  subregions: { kind: 'concentric', fractions: [0.5] },
  rules,
  ...overrides,
});

async function postStudy(body: object, headers: Record<string, string> = asResearcher()): Promise<string> {
  const res = await request(ctx.app).post('/api/studies').set(headers).send(body);
  if (res.status !== 202) throw new Error(`POST /api/studies answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

async function getStudy(id: string): Promise<StudyDetail> {
  const res = await request(ctx.app).get(`/api/studies/${id}`).set(asResearcher());
  if (res.status !== 200) throw new Error(`GET /api/studies/${id} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return studyDetailSchema.parse(res.body);
}

const finished = (s: StudyDetail) => ['done', 'failed', 'cancelled'].includes(s.status);
const post = (path: string, body?: object, headers: Record<string, string> = asResearcher()) => request(ctx.app).post(path).set(headers).send(body ?? {});

describe('retrying a failed cell', () => {
  let id: string;

  it('queues the failed cell again, reopens the study and counts the cell in the aggregates once done', async () => {
    // a cell whose job Redis lost is failed by the sweep: a failure at a known place, as in production
    id = await postStudy(study());
    const [lost, kept] = (await getStudy(id)).cells;
    await (await ctx.computeQueue.getJob(studyCellJobId(lost!.id)))!.remove();
    const report = await sweepOrphanedWork({ dataSource: ctx.dataSource, queue: ctx.computeQueue, graceMs: 0 });
    expect(report.cells).toEqual([lost!.id]);
    worker = await startTestWorker(ctx);
    const failed = await waitUntil(() => getStudy(id), finished, 30_000);
    expect(failed.status).toBe('failed');
    expect(failed.error).toMatch(/no longer in the queue/);
    expect(failed.aggregates.every((a) => a.seeds === 1)).toBe(true);

    const notFailed = await post(`/api/studies/${id}/cells/${kept!.id}/retry`);
    expect(notFailed.status).toBe(409);
    expect(notFailed.body.error).toMatchObject({ code: 'cell_not_failed', message: 'The cell N = 80, seed r-2 is done; only a failed cell can be retried.' });

    const retried = await post(`/api/studies/${id}/cells/${lost!.id}/retry`);
    expect(retried.status).toBe(202);
    expect(retried.body).toEqual({ cellIds: [lost!.id] });
    const reopened = await getStudy(id);
    expect(['queued', 'running', 'done']).toContain(reopened.status);
    expect(reopened.cells.find((c) => c.id === lost!.id)!.error).toBeNull();

    const done = await waitUntil(() => getStudy(id), finished, 30_000);
    expect(done.status).toBe('done');
    expect(done.error).toBeNull();
    expect(done.progress).toMatchObject({ done: 2, failed: 0, total: 2 });
    // 1 N × 1 sub-diamond × 2 rules, each over both seeds now
    expect(done.aggregates).toHaveLength(2);
    expect(done.aggregates.every((a) => a.seeds === 2 && a.seS !== null)).toBe(true);

    const nothingToRetry = await post(`/api/studies/${id}/retry-failed`);
    expect(nothingToRetry.status).toBe(409);
    expect(nothingToRetry.body.error.code).toBe('no_failed_cells');
  }, 90_000);

  it('retries every failed cell at once', async () => {
    await worker!.close();
    worker = null;
    const many = await postStudy(study({ title: 'two lost cells', seeds: ['a-1', 'a-2', 'a-3'] }));
    const cells = (await getStudy(many)).cells;
    for (const cell of cells.slice(0, 2)) await (await ctx.computeQueue.getJob(studyCellJobId(cell.id)))!.remove();
    await sweepOrphanedWork({ dataSource: ctx.dataSource, queue: ctx.computeQueue, graceMs: 0 });
    expect((await getStudy(many)).cells.map((c) => c.status)).toEqual(['failed', 'failed', 'queued']);
    const retried = await post(`/api/studies/${many}/retry-failed`);
    expect(retried.status).toBe(202);
    expect([...retried.body.cellIds].sort()).toEqual(cells.slice(0, 2).map((c) => c.id).sort());
    worker = await startTestWorker(ctx);
    const done = await waitUntil(() => getStudy(many), finished, 30_000);
    expect(done.status).toBe('done');
    expect(done.aggregates.every((a) => a.seeds === 3)).toBe(true);
  }, 90_000);

  it('answers 404 for unknown cells and for other teams, 409 on a cancelled study', async () => {
    const cellId = (await getStudy(id)).cells[0]!.id;
    expect((await post(`/api/studies/${id}/cells/00000000-0000-4000-8000-000000000000/retry`)).status).toBe(404);
    expect((await post(`/api/studies/${id}/cells/not-a-cell/retry`)).body.error.message).toBe('Cell not found in this study.');
    const theirs = await post(`/api/studies/${id}/cells/${cellId}/retry`, {}, bearer(stranger.token));
    expect(theirs.status).toBe(404);
    expect(theirs.body.error.message).toBe('Study not found.');
    expect((await post(`/api/studies/${id}/retry-failed`, {}, bearer(stranger.token))).status).toBe(404);

    await worker!.close();
    worker = null;
    const stopped = await postStudy(study({ title: 'cancelled', seeds: ['c-1'] }));
    expect((await post(`/api/studies/${stopped}/cancel`)).status).toBe(200);
    const cancelled = await post(`/api/studies/${stopped}/retry-failed`);
    expect(cancelled.status).toBe(409);
    expect(cancelled.body.error.code).toBe('study_cancelled');
    const extend = await post(`/api/studies/${stopped}/extend`, { seedCount: 1 });
    expect(extend.status).toBe(409);
    worker = await startTestWorker(ctx);
  });
});

describe('extending a study', () => {
  let id: string;

  it('adds the missing (N, seed) cells after the existing ones, seeds by the same rule, and aggregates them', async () => {
    id = await postStudy(study({ title: 'to extend' }));
    const before = await waitUntil(() => getStudy(id), finished, 30_000);
    expect(before.status).toBe('done');
    const res = await post(`/api/studies/${id}/extend`, { counts: [120], seedCount: 1 });
    expect(res.status).toBe(202);
    expect(res.body.cellIds).toHaveLength(4);
    const grown = await getStudy(id);
    expect(grown.progress.total).toBe(6);
    expect(grown.counts).toEqual([80, 120]);
    expect(grown.seedCount).toBe(3);
    // the existing cells keep their ids and place; the new ones follow, smallest N first, seeds round-robin
    expect(grown.cells.slice(0, 2).map((c) => c.id)).toEqual(before.cells.map((c) => c.id));
    expect(grown.cells.map((c) => [c.N, c.seed])).toEqual([
      [80, 'r-1'],
      [80, 'r-2'],
      [80, 'r-3'],
      [120, 'r-1'],
      [120, 'r-2'],
      [120, 'r-3'],
    ]);
    expect((grown.request as { seeds: string[] }).seeds).toEqual(['r-1', 'r-2', 'r-3']);

    const done = await waitUntil(() => getStudy(id), finished, 60_000);
    expect(done.status).toBe('done');
    // 2 N × 1 sub-diamond × 2 rules, each over 3 seeds
    expect(done.aggregates).toHaveLength(4);
    expect(done.aggregates.every((a) => a.seeds === 3)).toBe(true);
    const csv = parseCsv((await request(ctx.app).get(`/api/studies/${id}/export?format=csv`).set(asResearcher())).text);
    expect(csv.rows).toHaveLength(6 * 2);
    // two N per rule: the fit of one sub-diamond across N has 2 points, the fit over all aggregates too
    expect(done.fits.filter((f) => f.subregion === null && f.model === 'log').every((f) => f.points === 2)).toBe(true);
  }, 90_000);

  it('refuses what the grown study could not hold, with the field and a message', async () => {
    const empty = await post(`/api/studies/${id}/extend`, {});
    expect(empty.status).toBe(400);
    expect(empty.body.error.issues[0]).toMatchObject({ path: 'counts', message: 'give more N values or more seeds' });
    const small = await post(`/api/studies/${id}/extend`, { counts: [10] });
    expect(small.status).toBe(400);
    expect(small.body.error.issues[0]).toMatchObject({ path: 'counts.0', message: 'N must be at least 20' });
    const both = await post(`/api/studies/${id}/extend`, { seeds: ['x'], seedCount: 2 });
    expect(both.status).toBe(400);
    expect(both.body.error.issues[0].message).toBe('give the new seeds by name or by number, not both');

    const again = await post(`/api/studies/${id}/extend`, { counts: [200, 80] });
    expect(again.status).toBe(422);
    expect(again.body.error.issues[0]).toMatchObject({ path: 'counts.1', message: 'the study already has N = 80' });
    const seedAgain = await post(`/api/studies/${id}/extend`, { seeds: ['r-2'] });
    expect(seedAgain.status).toBe(422);
    expect(seedAgain.body.error.issues[0]).toMatchObject({ path: 'seeds.0', message: 'the study already has the seed "r-2"' });
    // a smaller N must still hold the sub-diamond: ℓ/T = 0.5 holds N/4 elements, fewer than 8 at N = 24
    const tiny = await post(`/api/studies/${id}/extend`, { counts: [24] });
    expect(tiny.status).toBe(422);
    expect(tiny.body.error.message).toMatch(/about 6\.0 elements at N = 24/);
    // the cell limit applies to the total: 12 N × 34 seeds = 408 > 400
    const tooMany = await post(`/api/studies/${id}/extend`, { counts: [100, 140, 160, 180, 200, 220, 240, 260, 280, 300], seedCount: 31 });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.issues[0]).toMatchObject({ path: 'seeds', message: 'a study holds at most 400 sprinklings (N values × seeds)' });
    const huge = await post(`/api/studies/${id}/extend`, { counts: [100_000] });
    expect(huge.status).toBe(422);
    expect(huge.body.error.code).toBe('too_large');

    expect((await post(`/api/studies/00000000-0000-4000-8000-000000000000/extend`, { seedCount: 1 })).status).toBe(404);
    const theirs = await post(`/api/studies/${id}/extend`, { seedCount: 1 }, bearer(stranger.token));
    expect(theirs.status).toBe(404);
    // nothing of that changed the study
    expect((await getStudy(id)).progress.total).toBe(6);
  });
});

describe('a study cell opened as a run', () => {
  it('computes the cell’s own sprinkling, subregion and rule: the run’s S is the cell’s, and the run says where it came from', async () => {
    const id = await postStudy(study({ title: 'cells as runs', seeds: ['v-1'], counts: [120] }));
    const done = await waitUntil(() => getStudy(id), finished, 30_000);
    expect(done.status).toBe('done');
    const cell = done.cells[0]!;
    const csv = parseCsv((await request(ctx.app).get(`/api/studies/${id}/export?format=csv`).set(asResearcher())).text);
    const column = (name: string) => csv.header.indexOf(name);
    let last: ReturnType<typeof runDetailSchema.parse> | undefined;
    for (const rule of ['none', 'sqrtN+double']) {
      const res = await post(`/api/studies/${id}/cells/${cell.id}/run`, { subregion: 'l/L=0.5', rule });
      expect(res.status).toBe(202);
      const run = await waitUntil(
        async () => runDetailSchema.parse((await request(ctx.app).get(`/api/runs/${res.body.id}`).set(asResearcher())).body),
        (r) => ['done', 'failed'].includes(r.status),
        30_000,
      );
      expect(run.status).toBe('done');
      const row = csv.rows.find((r) => r[column('cell')] === cell.id && r[column('rule')] === rule && r[column('subregion')] === 'l/L=0.5')!;
      // the same sprinkling, state and cut on the dense engine: the same S to rounding (DEVELOPERS.md, reproducibility to 1e-12)
      const cellS = Number(row[column('S')]);
      expect(Math.abs(run.result!.entropy!.S - cellS)).toBeLessThan(1e-12 * Math.max(1, Math.abs(cellS)));
      expect(run.result!.entropy!.n).toBe(Number(row[column('n')]));
      expect(run.N).toBe(120);
      expect(runOriginOf(run.request)).toEqual({
        kind: 'study-cell',
        studyId: id,
        studyTitle: 'cells as runs',
        cellId: cell.id,
        N: 120,
        seed: 'v-1',
        subregion: 'l/L=0.5',
        subregionLabel: 'ℓ/T = 0.5',
        rule,
      });
      expect(run.title).toMatch(/^cells as runs: N = 120, seed v-1, ℓ\/T = 0\.5, /);
      last = run;
    }
    // the run has what any run has beside S: its diagnostics, spectrum and points
    expect(last!.result!.diagnostics.hermiticity).toEqual(expect.any(Number));
    expect(last!.result!.eigenvalues.length).toBeGreaterThan(0);
    const points = await request(ctx.app).get(`/api/runs/${last!.id}/points`).set(asResearcher());
    expect(points.status).toBe(200);
    expect(points.body.points).toHaveLength(120);
    expect(points.body.subregionElements).toHaveLength(last!.result!.entropy!.n);
  }, 90_000);

  it('refuses a cell that is not done, a subregion or rule the study lacks, and other teams', async () => {
    await worker!.close();
    worker = null;
    const id = await postStudy(study({ title: 'queued cells', seeds: ['q-1'] }));
    const cell = (await getStudy(id)).cells[0]!;
    const queued = await post(`/api/studies/${id}/cells/${cell.id}/run`, { subregion: 'l/L=0.5', rule: 'none' });
    expect(queued.status).toBe(409);
    expect(queued.body.error.message).toBe('The cell N = 80, seed q-1 is queued; a cell opens as a run once it is done.');
    await ctx.dataSource.query(`UPDATE study_cells SET status = 'done' WHERE id = $1`, [cell.id]);
    const noSubregion = await post(`/api/studies/${id}/cells/${cell.id}/run`, { subregion: 'l/L=0.9', rule: 'none' });
    expect(noSubregion.status).toBe(422);
    expect(noSubregion.body.error.issues[0]).toMatchObject({ path: 'subregion', message: 'the study has no subregion "l/L=0.9"; it has "l/L=0.5"' });
    const noRule = await post(`/api/studies/${id}/cells/${cell.id}/run`, { subregion: 'l/L=0.5', rule: 'knee' });
    expect(noRule.status).toBe(422);
    expect(noRule.body.error.issues[0].path).toBe('rule');
    const noBody = await post(`/api/studies/${id}/cells/${cell.id}/run`, {});
    expect(noBody.status).toBe(400);
    const theirs = await post(`/api/studies/${id}/cells/${cell.id}/run`, { subregion: 'l/L=0.5', rule: 'none' }, bearer(stranger.token));
    expect(theirs.status).toBe(404);
    worker = await startTestWorker(ctx);
  });
});

describe('search and filters on the studies list', () => {
  it('narrows the list by words of the title, status, region kind, author and day, and says nothing matched with an empty list', async () => {
    const cylinder = await postStudy(
      study({ title: 'Cylinder entropies by Kofi', region: { kind: 'cylinder2d', properTime: 2, circumference: 4 }, seeds: ['k-1'] }),
      asColleague(),
    );
    const list = async (query: Record<string, string>) => {
      const res = await request(ctx.app).get('/api/studies').query(query).set(asResearcher());
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      return studyListResponseSchema.parse(res.body).items;
    };
    const all = await list({});
    expect(all.length).toBeGreaterThanOrEqual(5);

    expect((await list({ search: 'cylinder ENTROP' })).map((s) => s.id)).toEqual([cylinder]);
    expect((await list({ search: cylinder.slice(0, 8) })).map((s) => s.id)).toEqual([cylinder]);
    // LIKE's own characters are plain text
    expect(await list({ search: '%' })).toEqual([]);
    expect((await list({ regionKind: 'cylinder2d' })).map((s) => s.id)).toEqual([cylinder]);
    expect((await list({ authorId: colleague.id })).map((s) => s.id)).toEqual([cylinder]);
    expect((await list({ authorId: researcher.id })).every((s) => s.author.id === researcher.id)).toBe(true);
    const cancelled = await list({ status: 'cancelled' });
    expect(cancelled.map((s) => s.title)).toEqual(['cancelled']);
    expect((await list({ status: 'done', search: 'to extend' })).map((s) => s.title)).toEqual(['to extend']);

    const today = new Date().toISOString().slice(0, 10);
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    expect(await list({ createdFrom: today, createdTo: today })).toHaveLength(all.length);
    expect(await list({ createdTo: yesterday })).toEqual([]);
    // blank parameters, as an untouched select sends them, filter nothing
    expect(await list({ status: '', search: '' })).toHaveLength(all.length);

    const badDay = await request(ctx.app).get('/api/studies').query({ createdFrom: '2026-02-30' }).set(asResearcher());
    expect(badDay.status).toBe(400);
    expect(badDay.body.error.issues[0]).toMatchObject({ path: 'createdFrom', message: 'not a calendar date' });
    const backwards = await request(ctx.app).get('/api/studies').query({ createdFrom: today, createdTo: yesterday }).set(asResearcher());
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.issues[0].message).toBe('the first day comes after the last one');
    const badStatus = await request(ctx.app).get('/api/studies').query({ status: 'finished' }).set(asResearcher());
    expect(badStatus.status).toBe(400);
    const unknown = await request(ctx.app).get('/api/studies').query({ colour: 'red' }).set(asResearcher());
    expect(unknown.status).toBe(400);
    // another team sees none of ours, whatever it searches for
    const theirs = await request(ctx.app).get('/api/studies').query({ search: 'Cylinder' }).set(bearer(stranger.token));
    expect(theirs.body.items).toEqual([]);
  });
});
