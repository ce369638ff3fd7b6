import type { Worker } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemoTeam } from '../../server/db/demo-team';
import { demoRuns, queueDemoWork } from '../../server/demoWork';
import { createTestContext, startTestWorker, type TestContext } from '../support/app';

// Issue 18 §8: the demo team starts with computed work, queued through the normal services and worker.
let ctx: TestContext;
let worker: Worker;

beforeAll(async () => {
  ctx = await createTestContext();
  await seedDemoTeam(ctx.dataSource, ctx.config.bcryptCost);
  worker = await startTestWorker(ctx);
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

async function states(): Promise<{ runs: Record<string, number>; studies: Record<string, number> }> {
  const count = async (table: string) =>
    Object.fromEntries(
      ((await ctx.dataSource.query(`SELECT status, count(*)::int AS n FROM ${table} GROUP BY status`)) as { status: string; n: number }[]).map((r) => [r.status, r.n]),
    );
  return { runs: await count('runs'), studies: await count('studies') };
}

describe('the demo team’s first work', () => {
  it('queues the demo runs and the study once, and the worker computes every one of them', async () => {
    const queued = await queueDemoWork(ctx.dataSource, ctx.computeQueue);
    expect(queued).toHaveLength(demoRuns.length + 1);
    // a second start finds the team busy and adds nothing
    expect(await queueDemoWork(ctx.dataSource, ctx.computeQueue)).toEqual([]);

    const finished = (s: Awaited<ReturnType<typeof states>>) =>
      (s.runs.done ?? 0) + (s.runs.failed ?? 0) === demoRuns.length && (s.studies.done ?? 0) + (s.studies.failed ?? 0) === 1;
    const deadline = Date.now() + 240_000;
    let now = await states();
    while (!finished(now) && Date.now() < deadline) {
      await new Promise((r) => setTimeout(r, 1000));
      now = await states();
    }
    expect(now).toEqual({ runs: { done: demoRuns.length }, studies: { done: 1 } });
    const rows: { title: string; entropy_s: number | null }[] = await ctx.dataSource.query('SELECT title, entropy_s FROM runs ORDER BY title');
    // the runs with a subregion carry an entropy
    expect(rows.filter((r) => r.entropy_s !== null)).toHaveLength(demoRuns.filter((r) => r.subregion).length);
  }, 300_000);
});
