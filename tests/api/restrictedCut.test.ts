import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDetailSchema } from '@shared/runs';
import type { SprinklingSpecInput } from '@shared/vacuum';
import { studyDetailSchema, type StudyDetail } from '@shared/studies';
import { computeVacuum } from '../../server/engine/index';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { bearer, diamondRun, getRun, parseCsv, postRun, waitForRun, waitUntil } from '../worker/runHelpers';

/**
 * The restricted cut of double truncation (Sorkin–Yazdi 2018: √n/(4π) by default, or a fixed λ) stored with
 * runs and studies and shown in their results and exports; and the caution beside 4D results that use the 2D
 * cut √N/(4π). The numbers themselves are checked against numpy in tests/engine/restrictedCut.test.ts; here
 * the stored result must equal the engine's for the same request.
 */
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  researcher = await signUp(ctx.app, { name: 'Ilse Marnoch' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const subregion = { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } } as const;

describe('runs keep their restricted cut', () => {
  it('stores a fixed restricted λ, computes with it and says so in the summary and the result', async () => {
    const body = diamondRun({ subregion, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 0.4 } }, { count: 200, seed: 'restricted-1' });
    const id = await postRun(ctx.app, researcher.token, body);
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    const detail = runDetailSchema.parse(run);
    expect(detail.status).toBe('done');
    expect(detail.restrictedCut).toBe('lambda:0.4');
    expect((detail.request as { restrictedCut?: unknown }).restrictedCut).toEqual({ rule: 'lambda', cut: 0.4 });
    expect(detail.result!.entropy).toMatchObject({ restrictedCut: { rule: 'lambda', cut: 0.4 }, cutoff: 0.4, doubleTruncation: true });
    const direct = await computeVacuum({
      source: { kind: 'sprinkling', sprinkling: body.sprinkling as SprinklingSpecInput },
      truncation: { rule: 'sqrtN' },
      subregion,
      doubleTruncation: true,
      restrictedCut: { rule: 'lambda', cut: 0.4 },
    });
    expect(detail.result!.entropy!.S).toBeCloseTo(direct.entropy!.S, 10);
    expect(detail.result!.cautions).toEqual([]);

    // the runs table says it too
    const list = await request(ctx.app).get('/api/runs').set(bearer(researcher.token));
    expect(list.body.items.find((r: { id: string }) => r.id === id).restrictedCut).toBe('lambda:0.4');

    // a re-analysis keeps the parent's restricted cut unless told otherwise; null goes back to √n/(4π)
    const kept = await request(ctx.app).post(`/api/runs/${id}/reanalyse`).set(bearer(researcher.token)).send({ mass: 0 });
    expect(kept.status).toBe(202);
    expect((await getRun(ctx.app, researcher.token, kept.body.id)).restrictedCut).toBe('lambda:0.4');
    const reset = await request(ctx.app).post(`/api/runs/${id}/reanalyse`).set(bearer(researcher.token)).send({ restrictedCut: null });
    expect(reset.status).toBe(202);
    expect((await getRun(ctx.app, researcher.token, reset.body.id)).restrictedCut).toBe('sqrtN');
  }, 60_000);

  it('refuses a restricted cut without double truncation before storing anything', async () => {
    const before = await request(ctx.app).get('/api/runs').set(bearer(researcher.token));
    const res = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({ subregion, restrictedCut: { rule: 'sqrtN' } }));
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(/restricted cut applies only with double truncation/);
    const after = await request(ctx.app).get('/api/runs').set(bearer(researcher.token));
    expect(after.body.total).toBe(before.body.total);
  });

  it('puts the 4D caution for √N/(4π) beside the result', async () => {
    const id = await postRun(ctx.app, researcher.token, {
      title: '4D with the 2D rule',
      sprinkling: { region: { kind: 'diamond4d', properTime: 2 }, count: 300, seed: 'caution-4d' },
      truncation: { rule: 'sqrtN' },
    });
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    const result = runDetailSchema.parse(run).result!;
    expect(result.cautions).toHaveLength(1);
    expect(result.cautions![0]).toMatch(/√N\/\(4π\) is a rule from 2D work/);
    expect(result.cautions![0]).toContain(`keeps ${result.modesKept} of ${result.eigenvalues.length} positive modes`);
  }, 60_000);
});

describe('studies keep their restricted cut', () => {
  it('computes a rule with a fixed restricted λ and names it in labels, CSV, LaTeX, JSON and methods; 4D gets its caution', async () => {
    const res = await request(ctx.app)
      .post('/api/studies')
      .set(bearer(researcher.token))
      .send({
        title: 'restricted λ in 4D',
        region: { kind: 'diamond4d', properTime: 2 },
        counts: [160],
        seeds: ['r-1'],
        subregions: { kind: 'concentric', fractions: [0.8] },
        rules: [
          { truncation: { rule: 'knee' }, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 0.3 } },
          { truncation: { rule: 'sqrtN' }, doubleTruncation: true },
        ],
      });
    expect(res.status).toBe(202);
    const id = res.body.id as string;
    const get = async (): Promise<StudyDetail> => studyDetailSchema.parse((await request(ctx.app).get(`/api/studies/${id}`).set(bearer(researcher.token))).body);
    const done = await waitUntil(get, (s) => ['done', 'failed', 'cancelled'].includes(s.status), 60_000);
    expect(done.status).toBe('done');
    expect(done.ruleLabels).toEqual({
      'knee+double:lambda:0.3': 'double-truncated (state knee, restricted λ = 0.3)',
      'sqrtN+double': 'double-truncated (state √N/(4π), restricted √n/(4π))',
    });
    // √N/(4π) and √n/(4π) are 2D rules: both cautions, once each
    expect(done.cautions).toHaveLength(2);

    const exp = (format: string) => request(ctx.app).get(`/api/studies/${id}/export?format=${format}`).set(bearer(researcher.token));
    const tidy = parseCsv((await exp('csv')).text);
    const col = (name: string) => tidy.header.indexOf(name);
    const lambdaRows = tidy.rows.filter((r) => r[col('rule')] === 'knee+double:lambda:0.3');
    expect(lambdaRows).toHaveLength(1);
    expect(lambdaRows[0]![col('state_rule')]).toBe('knee');
    expect(lambdaRows[0]![col('restricted_cut')]).toBe('lambda:0.3');
    // the restricted cut applied is the fixed λ itself
    expect(Number(lambdaRows[0]![col('cutoff')])).toBe(0.3);

    const json = (await exp('json')).body as { rules: { key: string; restrictedCut: unknown; cautions: string[] }[] };
    expect(json.rules.find((r) => r.key === 'knee+double:lambda:0.3')).toMatchObject({ restrictedCut: { rule: 'lambda', cut: 0.3 }, cautions: [] });
    expect(json.rules.find((r) => r.key === 'sqrtN+double')!.cautions).toHaveLength(2);
    const latex = (await exp('latex')).text;
    expect(latex).toContain('restricted $\\lambda$ = 0.3');
    expect(latex).toContain('Caution:');
    const methods = (await exp('methods')).text;
    expect(methods).toContain('the fixed λ = 0.3');
    expect(methods).toMatch(/Caution: The whole-region cut √N\/\(4π\) is a rule from 2D work/);
  }, 90_000);
});
