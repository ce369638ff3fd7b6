import type { Worker } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import { postRun, waitForRun } from '../worker/runHelpers';

// Issue 16: a run keeps its causal set's manifold-likeness beside the vacuum (server/engine/README.md §16).
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  researcher = await signUp(ctx.app);
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

describe('a run’s manifold-likeness', () => {
  it('comes with a done run: counts equal to the run’s own, and a 2D diamond reads as 2D', async () => {
    const id = await postRun(ctx.app, researcher.token, {
      sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 600, seed: 'manifold-run' },
      truncation: { rule: 'sqrtN' },
    });
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    expect(run.status).toBe('done');
    const m = run.result!.manifold!;
    expect(m).toMatchObject({ N: 600, relations: run.result!.relations });
    // Myrheim 1978; Meyer 1988: ordering fraction ½, dimension 2, within twice the quoted error
    expect(Math.abs(m.dimension.myrheimMeyer.estimate! - 2)).toBeLessThanOrEqual(2 * m.dimension.myrheimMeyer.error!);
    // N_0 is the number of links: the 4D run below compares it with the engine's own link count
    expect(m.intervalAbundances[0]).toBe(m.links);
  });

  it('reads a 4D diamond as 4D', async () => {
    const id = await postRun(ctx.app, researcher.token, {
      sprinkling: { region: { kind: 'diamond4d', properTime: 2 }, count: 800, seed: 'manifold-4d' },
      truncation: { rule: 'knee' },
    });
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    const m = run.result!.manifold!;
    expect(m).toMatchObject({ relations: run.result!.relations, links: run.result!.links });
    expect(Math.abs(m.dimension.myrheimMeyer.estimate! - 4)).toBeLessThanOrEqual(2 * m.dimension.myrheimMeyer.error!);
  });
});
