import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { RunDetail } from '@shared/runs';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';
import { diamondRun, postRun, waitForRun } from '../worker/runHelpers';
import { spawnTsx, stopProcess, type Spawned } from './processes';

/**
 * Real worker processes (`tsx server/worker/main.ts`) against this file's database and queue prefix,
 * killed and stopped the hard way. BullMQ's lock and stalled check are shortened through the
 * environment so recovery happens in seconds instead of half a minute.
 */
let ctx: TestContext;
let user: SignedUpUser;
const spawned: Spawned[] = [];

beforeAll(async () => {
  ctx = await createTestContext();
  user = await signUp(ctx.app);
});
afterEach(async () => {
  for (const p of spawned.splice(0)) await stopProcess(p);
});
afterAll(async () => {
  await ctx?.close();
});

function startWorker(env: Record<string, string> = {}): Spawned {
  const worker = spawnTsx('server/worker/main.ts', {
    DATABASE_URL: ctx.database.url,
    TACET_QUEUE_PREFIX: ctx.config.queuePrefix,
    TACET_JOB_LOCK_MS: '2000',
    TACET_STALLED_INTERVAL_MS: '1000',
    TACET_SWEEP_GRACE_MS: '0',
    TACET_SWEEP_INTERVAL_MS: '2000',
    ...env,
  });
  spawned.push(worker);
  return worker;
}

/** A run long enough (a few seconds of eigendecomposition) to be interrupted in the middle. */
const longRun = () => diamondRun({ title: 'long' }, { count: 2500, seed: `fault-${Math.random()}` });
const isRunning = (run: RunDetail) => run.status === 'running';
const finished = (run: RunDetail) => ['done', 'failed', 'cancelled'].includes(run.status);

describe('a worker killed with SIGKILL in the middle of a run', () => {
  it('has its run re-run by another worker through BullMQ stalled-job recovery', async () => {
    const first = startWorker();
    await first.waitFor('waiting for jobs');
    const id = await postRun(ctx.app, user.token, longRun());
    await waitForRun(ctx.app, user.token, id, isRunning, 20_000);
    first.child.kill('SIGKILL');
    expect((await first.exited).signal).toBe('SIGKILL');

    const second = startWorker();
    await second.waitFor(`job ${id} stalled`, 20_000);
    const { run, seen } = await waitForRun(ctx.app, user.token, id, finished, 50_000);
    expect(run.status, run.error ?? '').toBe('done');
    expect(run.result!.N).toBe(2500);
    expect(seen).not.toContain('failed');
  }, 60_000);

  it('ends as failed with the reason when the job may not be re-run (stalled limit 0)', async () => {
    const env = { TACET_MAX_STALLED_COUNT: '0' };
    const first = startWorker(env);
    await first.waitFor('waiting for jobs');
    const id = await postRun(ctx.app, user.token, longRun());
    await waitForRun(ctx.app, user.token, id, isRunning, 20_000);
    first.child.kill('SIGKILL');
    await first.exited;

    startWorker(env);
    const { run } = await waitForRun(ctx.app, user.token, id, finished, 30_000);
    expect(run.status).toBe('failed');
    expect(run.error).toMatch(/computation stopped: its job failed: .*stalled/);
    expect(run.finishedAt).not.toBeNull();
  }, 60_000);
});

describe('the sweep', () => {
  it('fails runs left queued or running whose job is gone, when a worker starts', async () => {
    const runningId = await postRun(ctx.app, user.token, diamondRun({ title: 'orphan running' }));
    const queuedId = await postRun(ctx.app, user.token, diamondRun({ title: 'orphan queued' }));
    // as if a worker died after claiming the run and Redis then lost its data
    await ctx.dataSource.query(`UPDATE runs SET status = 'running', started_at = now() WHERE id = $1`, [runningId]);
    for (const id of [runningId, queuedId]) await (await ctx.computeQueue.getJob(id))!.remove();
    const alive = await postRun(ctx.app, user.token, diamondRun({ title: 'still queued' }));

    const worker = startWorker();
    await worker.waitFor('sweep: marked failed 2 run(s)', 20_000);
    for (const id of [runningId, queuedId]) {
      const run = (await request(ctx.app).get(`/api/runs/${id}`).set('Authorization', `Bearer ${user.token}`)).body as RunDetail;
      expect(run.status).toBe('failed');
      expect(run.error).toMatch(/no longer in the queue/);
    }
    // a run whose job is still there is computed, not swept
    expect((await waitForRun(ctx.app, user.token, alive, finished, 30_000)).run.status).toBe('done');
  }, 60_000);
});

describe('graceful shutdown on SIGTERM', () => {
  it('finishes the current run before exiting', async () => {
    const worker = startWorker();
    await worker.waitFor('waiting for jobs');
    const id = await postRun(ctx.app, user.token, longRun());
    await waitForRun(ctx.app, user.token, id, isRunning, 20_000);
    worker.child.kill('SIGTERM');
    const exit = await worker.exited;
    expect(exit.code).toBe(0);
    const run = (await request(ctx.app).get(`/api/runs/${id}`).set('Authorization', `Bearer ${user.token}`)).body as RunDetail;
    expect(run.status).toBe('done');
    expect(worker.output()).toMatch(/SIGTERM: finishing the current job/);
  }, 60_000);

  it('leaves a run that outlasts the grace period to another worker, which computes it', async () => {
    const worker = startWorker({ TACET_SHUTDOWN_GRACE_MS: '300' });
    await worker.waitFor('waiting for jobs');
    const id = await postRun(ctx.app, user.token, longRun());
    await waitForRun(ctx.app, user.token, id, isRunning, 20_000);
    worker.child.kill('SIGTERM');
    expect((await worker.exited).code).toBe(1);
    expect(worker.output()).toMatch(/grace period over/);

    startWorker();
    const { run } = await waitForRun(ctx.app, user.token, id, finished, 50_000);
    expect(run.status, run.error ?? '').toBe('done');
  }, 60_000);
});
