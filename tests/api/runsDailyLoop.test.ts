import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDetailSchema, runListResponseSchema, runPointsSchema } from '@shared/runs';
import { studyDetailSchema, studyListResponseSchema } from '@shared/studies';
import { insertMembership } from '../../server/db/repositories/teams';
import { runTiming, studyTiming, type QueueSnapshot, type TimedCell } from '../../server/api/services/queueStatus';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import { bearer, diamondRun, getRun, postRun, waitUntil } from '../worker/runHelpers';

/**
 * The daily loop of runs: Retry of a failed or cancelled run, "same settings, new seed", and the time
 * and queue facts on runs and studies. The worker starts only when the queue's order has been checked,
 * so the positions are exact, not a race.
 */
let ctx: TestContext;
let owner: SignedUpUser;
let viewer: SignedUpUser;
let worker: Worker | null = null;

beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { name: 'Oda Owner', teamName: 'Loop Team' });
  viewer = await signUp(ctx.app, { name: 'Vik Viewer' });
  await insertMembership(ctx.dataSource.manager, { userId: viewer.id, teamId: owner.teamId, role: 'viewer' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const asOwner = () => bearer(owner.token);
const asViewer = () => ({ ...bearer(viewer.token), 'x-tacet-team': owner.teamId });
const subregion = { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } } as const;
/** Inside the region but too small to hold an element: the worker fails the run after sprinkling. */
const emptySubregion = { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 0.001, x: 0 } } as const;

async function waitForStatus(id: string, statuses: string[]) {
  return waitUntil(() => getRun(ctx.app, owner.token, id), (run) => statuses.includes(run.status), 60_000);
}

describe('with the worker stopped', () => {
  let first: string;
  let second: string;
  let studyId: string;

  it('numbers the waiting runs and a study’s cells in the order a worker takes them', async () => {
    first = await postRun(ctx.app, owner.token, diamondRun({ title: 'first in line', subregion, doubleTruncation: true, renyi: [2], mass: 0.5 }, { seed: 'loop-1', prng: 'alea' }));
    second = await postRun(ctx.app, owner.token, diamondRun({ title: 'second in line' }, { seed: 'loop-2' }));
    const study = await request(ctx.app)
      .post('/api/studies')
      .set(asOwner())
      .send({ title: 'loop study', counts: [40], seeds: ['s-1', 's-2'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'sqrtN' } }] });
    expect(study.status).toBe(202);
    studyId = study.body.id;

    const a = runDetailSchema.parse(await getRun(ctx.app, owner.token, first));
    const b = runDetailSchema.parse(await getRun(ctx.app, owner.token, second));
    expect(a.timing).toEqual({ elapsedSeconds: null, estimatedSecondsLeft: null, queuePosition: 1, queueLength: 4 });
    expect(b.timing).toEqual({ elapsedSeconds: null, estimatedSecondsLeft: null, queuePosition: 2, queueLength: 4 });
    expect(a.retryOfRunId).toBeNull();

    const list = runListResponseSchema.parse((await request(ctx.app).get('/api/runs').set(asOwner())).body);
    expect(Object.fromEntries(list.items.map((r) => [r.id, r.timing.queuePosition]))).toEqual({ [first]: 1, [second]: 2 });

    // the study's next waiting cell is third; its second cell fourth
    const detail = studyDetailSchema.parse((await request(ctx.app).get(`/api/studies/${studyId}`).set(asOwner())).body);
    expect(detail.timing).toEqual({ elapsedSeconds: null, estimatedSecondsLeft: null, queuePosition: 3, queueLength: 4 });
    const studies = studyListResponseSchema.parse((await request(ctx.app).get('/api/studies').set(asOwner())).body);
    expect(studies.items.find((s) => s.id === studyId)!.timing.queuePosition).toBe(3);
  });

  it('moves everyone up when a run ahead is cancelled', async () => {
    await request(ctx.app).post(`/api/runs/${first}/cancel`).set(asOwner()).expect(200);
    expect((await getRun(ctx.app, owner.token, first)).timing.queuePosition).toBeNull();
    expect((await getRun(ctx.app, owner.token, second)).timing).toMatchObject({ queuePosition: 1, queueLength: 3 });
    const detail = studyDetailSchema.parse((await request(ctx.app).get(`/api/studies/${studyId}`).set(asOwner())).body);
    expect(detail.timing.queuePosition).toBe(2);
  });

  it('retries a cancelled run as a new run with the same settings that records which it retries', async () => {
    const refused = await request(ctx.app).post(`/api/runs/${first}/retry`).set(asViewer());
    expect(refused.status).toBe(403);

    const res = await request(ctx.app).post(`/api/runs/${first}/retry`).set(asOwner());
    expect(res.status).toBe(202);
    const retried = runDetailSchema.parse(await getRun(ctx.app, owner.token, res.body.id));
    const original = runDetailSchema.parse(await getRun(ctx.app, owner.token, first));
    expect(retried.id).not.toBe(first);
    expect(retried.retryOfRunId).toBe(first);
    expect(retried.request).toEqual({ ...(original.request as object), retryOf: first });
    expect(retried).toMatchObject({ status: 'queued', title: 'first in line', truncation: original.truncation, restrictedCut: original.restrictedCut, N: original.N });
    // the cancelled record stays as it was, and the retry waits at the end of the queue
    expect(original.status).toBe('cancelled');
    expect(retried.timing).toMatchObject({ queuePosition: 4, queueLength: 4 });
  });

  it('refuses to retry a run that is queued', async () => {
    const res = await request(ctx.app).post(`/api/runs/${second}/retry`).set(asOwner());
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/The run is queued; only failed or cancelled runs can be retried/);
  });
});

describe('with a worker', () => {
  it('finishes the queue; a done run has its computing time and no queue position', async () => {
    worker = await startTestWorker(ctx);
    const list = await waitUntil(
      async () => runListResponseSchema.parse((await request(ctx.app).get('/api/runs').set(asOwner())).body),
      (l) => l.items.every((r) => r.status === 'done' || r.status === 'cancelled'),
      60_000,
    );
    const done = list.items.filter((r) => r.status === 'done');
    expect(done).toHaveLength(2);
    for (const run of done) {
      const seconds = (Date.parse(run.finishedAt!) - Date.parse(run.startedAt!)) / 1000;
      expect(run.timing.elapsedSeconds).toBeCloseTo(seconds, 3);
      expect(run.timing).toMatchObject({ estimatedSecondsLeft: null, queuePosition: null, queueLength: 0 });
    }
  }, 90_000);

  it('refuses to retry a done run, and names what to do instead', async () => {
    const done = (await request(ctx.app).get('/api/runs?status=done').set(asOwner())).body.items[0].id as string;
    const res = await request(ctx.app).post(`/api/runs/${done}/retry`).set(asOwner());
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('run_not_retryable');
    expect(res.body.error.message).toMatch(/The run is done; only failed or cancelled runs can be retried.*new seed/);
  });

  it('retries a failed run with the same settings (and it fails the same way)', async () => {
    const failed = await postRun(ctx.app, owner.token, diamondRun({ title: 'empty subregion', subregion: emptySubregion }, { seed: 'loop-empty' }));
    const original = await waitForStatus(failed, ['failed', 'done']);
    expect(original.status).toBe('failed');
    const res = await request(ctx.app).post(`/api/runs/${failed}/retry`).set(asOwner());
    expect(res.status).toBe(202);
    const retried = await waitForStatus(res.body.id, ['failed', 'done']);
    expect(retried).toMatchObject({ status: 'failed', error: original.error, retryOfRunId: failed });
    expect(retried.request).toEqual({ ...(original.request as object), retryOf: failed });
  }, 90_000);

  it('queues the same settings with a fresh seed: other points, the same N, region and cut', async () => {
    const base = await postRun(ctx.app, owner.token, diamondRun({ title: 'reseed me', subregion }, { seed: 'loop-seed', count: 100 }));
    const original = await waitForStatus(base, ['done', 'failed']);
    expect(original.status).toBe('done');

    expect((await request(ctx.app).post(`/api/runs/${base}/reseed`).set(asViewer())).status).toBe(403);
    const res = await request(ctx.app).post(`/api/runs/${base}/reseed`).set(asOwner());
    expect(res.status).toBe(202);
    expect(res.body.seed).toMatch(/^[0-9a-f]{8}$/);
    expect(res.body.seed).not.toBe('loop-seed');
    const copy = await waitForStatus(res.body.id, ['done', 'failed']);
    expect(copy.status).toBe('done');
    const { sprinkling: originalSprinkling, ...originalRest } = original.request as { sprinkling: Record<string, unknown> };
    const { sprinkling, ...rest } = copy.request as { sprinkling: Record<string, unknown> };
    expect(rest).toEqual(originalRest);
    expect(sprinkling).toEqual({ ...originalSprinkling, seed: res.body.seed });
    expect(copy).toMatchObject({ N: 100, regionKind: 'diamond2d', truncation: original.truncation, retryOfRunId: null });
    const points = async (id: string) => runPointsSchema.parse((await request(ctx.app).get(`/api/runs/${id}/points`).set(asOwner())).body).points;
    expect(await points(res.body.id)).not.toEqual(await points(base));
  }, 90_000);

  it('re-seeds a re-analysis as a new sprinkling with its own settings, and refuses a run on an imported set', async () => {
    const base = (await request(ctx.app).get('/api/runs?status=done&search=reseed me').set(asOwner())).body.items[0].id as string;
    const reanalysis = await request(ctx.app).post(`/api/runs/${base}/reanalyse`).set(asOwner()).send({ truncation: { rule: 'none' } });
    expect(reanalysis.status).toBe(202);
    const res = await request(ctx.app).post(`/api/runs/${reanalysis.body.id}/reseed`).set(asOwner());
    expect(res.status).toBe(202);
    const copy = await getRun(ctx.app, owner.token, res.body.id);
    expect(copy.parentRunId).toBeNull();
    expect(copy.request).not.toHaveProperty('reusedPoints');
    expect(copy.request).toMatchObject({ truncation: { rule: 'none' }, sprinkling: { seed: res.body.seed, count: 100 } });

    const upload = request(ctx.app).post('/api/causal-sets').set(asOwner());
    upload.field('name', 'four points').field('kind', 'coordinates').field('region', JSON.stringify({ kind: 'diamond2d', properTime: 2 }));
    const set = await upload.attach('file', Buffer.from('t,x\n0.1,0.2\n-0.5,0.25\n0.5,-0.25\n0,0\n'), 'four.csv');
    expect(set.status).toBe(201);
    const onSet = await postRun(ctx.app, owner.token, { causalSetId: set.body.id, truncation: { rule: 'none' } });
    const refused = await request(ctx.app).post(`/api/runs/${onSet}/reseed`).set(asOwner());
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/imported causal set, which has no seed/);
  }, 60_000);
});

describe('the estimates (pure)', () => {
  const queue: QueueSnapshot = { positionOf: (id) => (id === 'queued-run' ? 3 : null), length: 7 };
  const at = (seconds: number) => new Date(Date.UTC(2026, 0, 1, 12, 0, seconds));

  it('takes a run’s time left as elapsed × (100 − p)/p, and none below a few percent', () => {
    // 30 s for a quarter of the work: 90 s for the other three quarters at the same pace (worked example)
    expect(runTiming({ id: 'r', status: 'running', percent: 25, startedAt: at(0), finishedAt: null }, queue, at(30))).toEqual({
      elapsedSeconds: 30,
      estimatedSecondsLeft: 90,
      queuePosition: null,
      queueLength: 7,
    });
    expect(runTiming({ id: 'r', status: 'running', percent: 2, startedAt: at(0), finishedAt: null }, queue, at(30)).estimatedSecondsLeft).toBeNull();
    expect(runTiming({ id: 'queued-run', status: 'queued', percent: 0, startedAt: null, finishedAt: null }, queue, at(30))).toMatchObject({ elapsedSeconds: null, queuePosition: 3 });
  });

  it('takes a study’s time left from its finished cells, an unseen N scaled by N³, over the cells computing at once', () => {
    const cell = (id: string, requestedN: number, status: TimedCell['status'], percent: number, start: number | null, end: number | null): TimedCell => ({
      id,
      requestedN,
      status,
      percent,
      startedAt: start === null ? null : at(start),
      finishedAt: end === null ? null : at(end),
    });
    const cells = [cell('a', 100, 'done', 100, 0, 2), cell('b', 100, 'done', 100, 2, 6), cell('c', 100, 'running', 50, 6, null), cell('d', 200, 'queued', 0, null, null)];
    // mean at N = 100: 3 s; the running cell has half of it left (1.5 s); N = 200 is 2³ = 8 times that (24 s)
    expect(studyTiming({ status: 'running', startedAt: at(0), finishedAt: null }, cells, queue, at(7))).toEqual({
      elapsedSeconds: 7,
      estimatedSecondsLeft: 25.5,
      queuePosition: null,
      queueLength: 7,
    });
    // two cells computing at once halve it
    const twoAtOnce = [...cells.slice(0, 3), cell('e', 100, 'running', 50, 6, null)];
    expect(studyTiming({ status: 'running', startedAt: at(0), finishedAt: null }, twoAtOnce, queue, at(7)).estimatedSecondsLeft).toBeCloseTo(1.5, 12);
    // nothing finished yet: no estimate
    expect(studyTiming({ status: 'running', startedAt: at(0), finishedAt: null }, [cell('c', 100, 'running', 50, 6, null)], queue, at(7)).estimatedSecondsLeft).toBeNull();
  });
});
