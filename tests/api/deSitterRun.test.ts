import type { Worker } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import request from 'supertest';
import { bearer, postRun, waitForRun } from '../worker/runHelpers';

// Issue 16 through the API: a massless run on a Poincaré-patch diamond with √N/(4π) and double truncation
// completes, carries the caution that the cut is a flat 2D rule there (server/engine/README.md §17), and
// its causal set reads as 2D (Myrheim 1978; Meyer 1988: the dimension estimators are conformally invariant,
// so a conformally flat 2D region reads as 2D like a flat one, server/engine/README.md §16).
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

describe('a de Sitter run', () => {
  it('completes on a Poincaré diamond with its caution and a 2D manifold-likeness', async () => {
    const id = await postRun(ctx.app, researcher.token, {
      sprinkling: { region: { kind: 'deSitterDiamond2d', etaPast: -2, etaFuture: -1 }, count: 500, seed: 'ds-api' },
      truncation: { rule: 'sqrtN' },
      doubleTruncation: true,
      subregion: { kind: 'diamond', past: { t: -1.75, x: 0 }, future: { t: -1.25, x: 0 } },
    });
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    expect(run.status).toBe('done');
    const result = run.result!;
    expect(result.cautions!.some((c: string) => /de Sitter region it is a modelling choice/.test(c))).toBe(true);
    expect(result.entropy).toMatchObject({ doubleTruncation: true });
    expect(result.entropy!.n).toBeGreaterThan(0);
    expect(Number.isFinite(result.entropy!.S)).toBe(true);
    const m = result.manifold!;
    expect(m.N).toBe(500);
    expect(Math.abs(m.dimension.myrheimMeyer.estimate! - 2)).toBeLessThanOrEqual(2 * m.dimension.myrheimMeyer.error!);
  });

  it('is refused with a massive field, naming mass, before anything is queued', async () => {
    const res = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send({ sprinkling: { region: { kind: 'deSitterDiamond2d', etaPast: -2, etaFuture: -1 }, count: 200, seed: 'ds-mass' }, truncation: { rule: 'sqrtN' }, mass: 0.5 });
    expect(res.status).toBe(422);
    expect(JSON.stringify(res.body)).toMatch(/mass/);
  });
});
