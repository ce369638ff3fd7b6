import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDetailSchema, runListResponseSchema, runPointsSchema } from '@shared/runs';
import type { SprinklingSpecInput } from '@shared/vacuum';
import { computeVacuum, DENSE_SIZE_LIMIT } from '../../server/engine/index';
import { STRUCTURED_MAX_N_2D } from '@shared/engineChoice';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { bearer, diamondRun, getRun, parseCsv, postRun, waitForRun, waitUntil } from '../worker/runHelpers';

/** Lifecycle of vacuum runs against the real worker (in this process), PostgreSQL and Redis. */
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  researcher = await signUp(ctx.app, { name: 'Ada Lindqvist' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const subregion = { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } } as const;
/** Inside the region but far too small to hold an element: only the worker can find that out, after sprinkling. */
const emptySubregion = { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 0.001, x: 0 } } as const;
const reproBody = diamondRun({ title: 'reproducible diamond', subregion }, { count: 200, seed: 'repro-7', prng: 'alea' });

async function jobState(id: string): Promise<string> {
  return (await (await ctx.computeQueue.getJob(id))?.getState()) ?? 'missing';
}

describe('a run from POST to result', () => {
  let runId: string;

  it('is queued, runs through the stages and ends done with the result', async () => {
    const res = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(reproBody);
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ id: expect.stringMatching(/^[0-9a-f-]{36}$/) });
    runId = res.body.id;
    const first = await getRun(ctx.app, researcher.token, runId);
    expect(['queued', 'running']).toContain(first.status);
    expect(first).toMatchObject({ title: 'reproducible diamond', N: 200, truncation: 'sqrtN', regionKind: 'diamond2d', dimension: 2 });

    const { run, seen } = await waitForRun(ctx.app, researcher.token, runId);
    expect(seen[seen.length - 1]).toBe('done');
    expect(seen.filter((s) => s !== 'queued' && s !== 'running' && s !== 'done')).toEqual([]);
    const detail = runDetailSchema.parse(run);
    expect(detail).toMatchObject({ status: 'done', percent: 100, error: null, cancelRequested: false, N: 200, author: { id: researcher.id, name: 'Ada Lindqvist' } });
    expect(detail.startedAt).not.toBeNull();
    expect(detail.finishedAt).not.toBeNull();
    const result = detail.result!;
    // In 2D iΔ of N elements has at most N/2 positive eigenvalues (they come in ± pairs, common practice).
    expect(result.eigenvalues.length).toBeGreaterThan(50);
    expect(result.eigenvalues.length).toBeLessThanOrEqual(100);
    for (let k = 1; k < result.eigenvalues.length; k++) expect(result.eigenvalues[k]).toBeLessThanOrEqual(result.eigenvalues[k - 1]!);
    // sqrtN rule: λ_c = √N/(4π) (Sorkin–Yazdi 2018, recalled from memory)
    expect(result.cutoff).toBeCloseTo(Math.sqrt(200) / (4 * Math.PI), 12);
    expect(result.modesKept).toBe(result.eigenvalues.filter((v) => v > result.cutoff).length);
    expect(result.diagnostics.hermiticity).toBeLessThan(1e-10);
    expect(Number.isFinite(result.diagnostics.trace)).toBe(true);
    expect(result.entropy).toMatchObject({ S: expect.any(Number), n: expect.any(Number), modesKept: expect.any(Number) });
    expect(result.entropy!.generalizedEigenvalues.length).toBeGreaterThan(0);
    expect(detail.S).toBe(result.entropy!.S);
    // continuum for a 2D diamond: the largest eigenvalue is N/(4 x₁), x₁ ≈ 1.165561 the first root of
    // tan x = 2x (Afshordi–Aslanbeigi–Sorkin 2012, recalled from memory)
    expect(result.continuum![0]).toBeCloseTo(200 / (4 * 1.1655611852072114), 6);
    expect(result.continuum!.length).toBe(result.eigenvalues.length);
    expect(result.engineVersion).toMatch(/^tacet-engine/);
    expect(result.backend).toMatch(/^(native|ml-matrix)$/);
    // N = 200 is below AUTO_STRUCTURED_FROM, so the rule picks the dense engine and says why
    expect(result.engine).toBe('dense');
    expect(result.engineReason).toMatch(/N < 1000/);
    expect(Object.keys(result.timings).sort()).toEqual(['entropy', 'green', 'order', 'spectrum', 'sprinkle', 'state']);
  });

  it('equals what the engine gives directly for the same request (same seed, same numbers)', async () => {
    const run = await getRun(ctx.app, researcher.token, runId);
    const direct = await computeVacuum({
      source: { kind: 'sprinkling', sprinkling: reproBody.sprinkling as SprinklingSpecInput },
      truncation: reproBody.truncation as { rule: 'sqrtN' },
      subregion,
    });
    const result = run.result!;
    expect(result.N).toBe(direct.N);
    expect(result.eigenvalues.length).toBe(direct.eigenvalues.length);
    result.eigenvalues.forEach((v, k) => expect(Math.abs(v - direct.eigenvalues[k]!)).toBeLessThanOrEqual(1e-12 * direct.eigenvalues[0]!));
    expect(result.modesKept).toBe(direct.modesKept);
    expect(result.relations).toBe(direct.relations);
    expect(result.entropy!.S).toBeCloseTo(direct.entropy!.S, 9);
    expect(result.entropy!.n).toBe(direct.entropy!.n);
    expect(result.engine).toBe(direct.engine);
    expect(result.engineReason).toBe(direct.engineReason);

    const csv = await request(ctx.app).get(`/api/runs/${runId}/points.csv`).set(bearer(researcher.token));
    const { rows } = parseCsv(csv.text);
    // 17 significant digits read back as the very same doubles (IEEE 754 round trip, common practice)
    expect(Float64Array.from(rows.flat(), Number)).toEqual(direct.points);
  });

  it('serves the points as CSV (full precision) and JSON with the subregion marked', async () => {
    const csv = await request(ctx.app).get(`/api/runs/${runId}/points.csv`).set(bearer(researcher.token));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(new RegExp(`^attachment; filename="?tacet-run-${runId.slice(0, 8)}-points\\.csv"?$`));
    const { header, rows } = parseCsv(csv.text);
    expect(header).toEqual(['t', 'x']);
    expect(rows.length).toBe(200);
    for (const cell of rows.flat()) expect(cell.replace(/e.*$/, '').replace(/[-.]/g, '').replace(/^0+/, '').length).toBe(17);

    const json = await request(ctx.app).get(`/api/runs/${runId}/points`).set(bearer(researcher.token));
    const points = runPointsSchema.parse(json.body);
    expect(points.columns).toEqual(['t', 'x']);
    expect(points.points.map((p) => p.map((c) => c.toPrecision(17)))).toEqual(rows);
    // the subregion is p ≺ e ≺ q in 2D Minkowski: Δt > |Δx| on both sides (common practice)
    const inside = points.points.flatMap(([t, x], i) =>
      t! - subregion.past.t > Math.abs(x! - subregion.past.x) && subregion.future.t - t! > Math.abs(subregion.future.x - x!) ? [i] : [],
    );
    expect(points.subregionElements).toEqual(inside);
    expect((await getRun(ctx.app, researcher.token, runId)).result!.entropy!.n).toBe(inside.length);
  });

  it('serves the spectrum as CSV and JSON', async () => {
    const run = await getRun(ctx.app, researcher.token, runId);
    const csv = await request(ctx.app).get(`/api/runs/${runId}/spectrum.csv`).set(bearer(researcher.token));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-disposition']).toContain(`tacet-run-${runId.slice(0, 8)}-spectrum.csv`);
    const { header, rows } = parseCsv(csv.text);
    expect(header).toEqual(['rank', 'eigenvalue', 'continuum', 'kept']);
    expect(rows.map((r) => Number(r[0]))).toEqual(run.result!.eigenvalues.map((_, k) => k + 1));
    expect(rows.map((r) => Number(r[1]))).toEqual(run.result!.eigenvalues);
    expect(rows.map((r) => Number(r[2]))).toEqual(run.result!.continuum);
    expect(rows.filter((r) => r[3] === '1').length).toBe(run.result!.modesKept);

    const json = await request(ctx.app).get(`/api/runs/${runId}/spectrum.json`).set(bearer(researcher.token));
    expect(json.body).toEqual({
      eigenvalues: run.result!.eigenvalues,
      continuum: run.result!.continuum,
      cutoff: run.result!.cutoff,
      modesKept: run.result!.modesKept,
      N: 200,
    });
  });

  it('re-analyses the exact same points as a new run with another truncation', async () => {
    const res = await request(ctx.app)
      .post(`/api/runs/${runId}/reanalyse`)
      .set(bearer(researcher.token))
      .send({ truncation: { rule: 'modes', count: 12 }, subregion: null });
    expect(res.status).toBe(202);
    const childId = res.body.id as string;
    expect(childId).not.toBe(runId);
    const { run: child } = await waitForRun(ctx.app, researcher.token, childId);
    expect(child).toMatchObject({ status: 'done', parentRunId: runId, truncation: 'modes:12', S: null, title: 'reproducible diamond (re-analysis)' });
    expect(child.result!.modesKept).toBe(12);
    expect(child.result!.entropy).toBeNull();
    const parent = await getRun(ctx.app, researcher.token, runId);
    child.result!.eigenvalues.forEach((v, k) => expect(Math.abs(v - parent.result!.eigenvalues[k]!)).toBeLessThanOrEqual(1e-12 * v + 1e-12));
    const [parentCsv, childCsv] = await Promise.all(
      [runId, childId].map((id) => request(ctx.app).get(`/api/runs/${id}/points.csv`).set(bearer(researcher.token))),
    );
    expect(childCsv.text).toBe(parentCsv.text);
    expect((child.request as { reusedPoints: { runId: string } }).reusedPoints.runId).toBe(runId);
  });

  it('re-analyses on another engine when asked, and refuses an engine that cannot serve the new cut', async () => {
    const res = await request(ctx.app)
      .post(`/api/runs/${runId}/reanalyse`)
      .set(bearer(researcher.token))
      .send({ truncation: { rule: 'sqrtN' }, subregion: null, engine: 'structured' });
    expect(res.status).toBe(202);
    const { run: child } = await waitForRun(ctx.app, researcher.token, res.body.id as string);
    expect(child.status).toBe('done');
    expect(child.result!.engine).toBe('structured');
    expect((child.request as { engine?: string }).engine).toBe('structured');
    // the structured engine computes the modes above the cut; they agree with the dense parent's
    const parent = await getRun(ctx.app, researcher.token, runId);
    expect(child.result!.modesKept).toBe(parent.result!.modesKept);
    for (let k = 0; k < child.result!.modesKept; k++) {
      expect(Math.abs(child.result!.eigenvalues[k]! - parent.result!.eigenvalues[k]!)).toBeLessThan(1e-8 * parent.result!.eigenvalues[0]!);
    }
    // every mode (truncation none) is beyond the structured engine: refused before anything is queued
    const refused = await request(ctx.app)
      .post(`/api/runs/${runId}/reanalyse`)
      .set(bearer(researcher.token))
      .send({ truncation: { rule: 'none' }, engine: 'structured' });
    expect(refused.status).toBe(422);
    expect(refused.body.error.message).toMatch(/structured engine/i);
  });

  it('lists done runs sorted by entropy with runs without S last', async () => {
    const res = await request(ctx.app).get('/api/runs?status=done&sort=S&order=desc').set(bearer(researcher.token));
    const list = runListResponseSchema.parse(res.body);
    expect(list.items[0]!.id).toBe(runId);
    expect(list.items[list.items.length - 1]!.S).toBeNull();
  });

  it('re-analysis of a run that is not done is refused', async () => {
    const queuedId = await postRun(ctx.app, researcher.token, diamondRun({ subregion: emptySubregion }));
    const res = await request(ctx.app).post(`/api/runs/${queuedId}/reanalyse`).set(bearer(researcher.token)).send({});
    expect([409]).toContain(res.status);
    await waitForRun(ctx.app, researcher.token, queuedId);
  });
});

describe('failures and limits', () => {
  it('fails a run whose subregion holds no element, with the engine message and no result', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ subregion: emptySubregion }));
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    expect(run.status).toBe('failed');
    expect(run.error).toMatch(/subregion holds 0 element\(s\)/);
    // the subregion's elements are found right after the order (server/engine/subregionEntropies.ts), before any heavy stage
    expect(run.stage).toBe('order');
    expect(run.result).toBeNull();
    const spectrum = await request(ctx.app).get(`/api/runs/${id}/spectrum.csv`).set(bearer(researcher.token));
    expect(spectrum.status).toBe(409);
    await waitUntil(() => jobState(id), (s) => s === 'failed');
    expect((await ctx.computeQueue.getJob(id))!.attemptsMade).toBe(1);
  });

  it('refuses sizes above the dense limit with 422, the limit and the reason', async () => {
    // truncation none needs every mode, so only the dense engine serves it and its limit applies
    const denseOnly = { truncation: { rule: 'none' } };
    const res = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(diamondRun(denseOnly, { count: DENSE_SIZE_LIMIT.maxN + 1 }));
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('too_large');
    expect(res.body.error.message).toContain(`dense limit of ${DENSE_SIZE_LIMIT.maxN} elements`);
    expect(res.body.error.message).toMatch(/N×N float64 matrices/);
    // a forced dense engine keeps the dense limit even where the structured one could serve
    const forcedDense = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({ engine: 'dense' }, { count: DENSE_SIZE_LIMIT.maxN + 1 }));
    expect(forcedDense.status).toBe(422);
    expect(forcedDense.body.error.code).toBe('too_large');
    expect(forcedDense.body.error.message).toContain(`dense limit of ${DENSE_SIZE_LIMIT.maxN} elements`);
    // Poisson: expected N plus five standard deviations must fit (the diamond's volume is τ²/2 = 2)
    const poisson = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun(denseOnly, { process: 'poisson', count: undefined, density: DENSE_SIZE_LIMIT.maxN / 2 }));
    expect(poisson.status).toBe(422);
    expect(poisson.body.error.code).toBe('too_large');
    const list = await request(ctx.app).get('/api/runs?pageSize=200').set(bearer(researcher.token));
    expect(list.body.items.map((r: { N: number }) => r.N)).not.toContain(DENSE_SIZE_LIMIT.maxN + 1);
  });

  it('refuses 2D cut runs above the structured limit, and a forced structured engine where it cannot serve', async () => {
    const over = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({}, { count: STRUCTURED_MAX_N_2D + 1 }));
    expect(over.status).toBe(422);
    expect(over.body.error.code).toBe('too_large');
    expect(over.body.error.message).toContain(`the structured engine accepts at most ${STRUCTURED_MAX_N_2D} elements`);
    const forcedOver = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({ engine: 'structured' }, { count: STRUCTURED_MAX_N_2D + 1 }));
    expect(forcedOver.status).toBe(422);
    expect(forcedOver.body.error.code).toBe('too_large');
    expect(forcedOver.body.error.message).toContain(`structured limit of ${STRUCTURED_MAX_N_2D} elements`);
    const forcedNone = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({ engine: 'structured', truncation: { rule: 'none' } }));
    expect(forcedNone.status).toBe(422);
    expect(forcedNone.body.error.code).toBe('invalid_request');
    expect(forcedNone.body.error.message).toMatch(/only the modes above a cut/);
    const fourD = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({}, { region: { kind: 'diamond4d', properTime: 2 }, count: DENSE_SIZE_LIMIT.maxN + 1 }));
    expect(fourD.status).toBe(422);
    expect(fourD.body.error.code).toBe('too_large');
    expect(fourD.body.error.message).toContain(`dense limit of ${DENSE_SIZE_LIMIT.maxN} elements`);
  });

  it('records the structured engine when it ran, with only the modes above the cut', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ engine: 'structured' }, { count: 300 }));
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    expect(run.status).toBe('done');
    const result = runDetailSchema.parse(run).result!;
    expect(result.engine).toBe('structured');
    expect(result.engineReason).toBe('forced by the request');
    // sqrtN rule: λ_c = √N/(4π) (Sorkin–Yazdi 2018, recalled from memory); the structured engine stops at the cut
    expect(result.cutoff).toBeCloseTo(Math.sqrt(300) / (4 * Math.PI), 12);
    expect(result.eigenvalues.length).toBe(result.modesKept);
    for (const v of result.eigenvalues) expect(v).toBeGreaterThan(result.cutoff);
  });

  it('rejects malformed bodies (400) and inconsistent ones (422) without storing anything', async () => {
    const before = (await request(ctx.app).get('/api/runs').set(bearer(researcher.token))).body.total;
    const missing = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send({ truncation: { rule: 'sqrtN' } });
    expect(missing.status).toBe(400);
    expect(missing.body.error.code).toBe('validation_failed');
    const badRule = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(diamondRun({ truncation: { rule: 'lambda' } }));
    expect(badRule.status).toBe(400);
    const doubleWithout = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(diamondRun({ doubleTruncation: true }));
    expect(doubleWithout.status).toBe(422);
    expect(doubleWithout.body.error).toMatchObject({ code: 'invalid_request', message: 'double truncation needs a subregion or a mutual-information pair' });
    const tips4d = await request(ctx.app)
      .post('/api/runs')
      .set(bearer(researcher.token))
      .send(diamondRun({ subregion: { kind: 'diamond', past: { t: -1, x: 0, y: 0, z: 0 }, future: { t: 1, x: 0, y: 0, z: 0 } } }));
    expect(tips4d.status).toBe(422);
    expect((await request(ctx.app).get('/api/runs').set(bearer(researcher.token))).body.total).toBe(before);
  });
});

describe('cancel and delete', () => {
  it('cancels a running run: the worker stops and the run ends cancelled without a result', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ title: 'to cancel' }, { count: 300 }));
    await waitForRun(ctx.app, researcher.token, id, (r) => r.status !== 'queued');
    const seenBefore = await getRun(ctx.app, researcher.token, id);
    const res = await request(ctx.app).post(`/api/runs/${id}/cancel`).set(bearer(researcher.token));
    expect(res.status).toBe(200);
    expect(res.body, JSON.stringify(seenBefore)).toMatchObject({ id, cancelRequested: true });
    const { run } = await waitForRun(ctx.app, researcher.token, id);
    expect(run.status).toBe('cancelled');
    expect(run.result).toBeNull();
    expect(run.finishedAt).not.toBeNull();
    await waitUntil(() => jobState(id), (s) => s === 'completed');
    const again = await request(ctx.app).post(`/api/runs/${id}/cancel`).set(bearer(researcher.token));
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('run_finished');
  });

  it('deletes a finished run: 204, then 404 everywhere', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ title: 'to delete' }, { count: 60 }));
    await waitForRun(ctx.app, researcher.token, id);
    expect((await request(ctx.app).delete(`/api/runs/${id}`).set(bearer(researcher.token))).status).toBe(204);
    for (const path of ['', '/points.csv', '/spectrum.csv', '/points']) {
      expect((await request(ctx.app).get(`/api/runs/${id}${path}`).set(bearer(researcher.token))).status).toBe(404);
    }
    expect((await request(ctx.app).delete(`/api/runs/${id}`).set(bearer(researcher.token))).status).toBe(404);
  });

  it('deletes a running run: the worker abandons it and stores nothing', async () => {
    const id = await postRun(ctx.app, researcher.token, diamondRun({ title: 'deleted while running' }, { count: 300 }));
    await waitForRun(ctx.app, researcher.token, id, (r) => r.status !== 'queued');
    expect((await request(ctx.app).delete(`/api/runs/${id}`).set(bearer(researcher.token))).status).toBe(204);
    await waitUntil(() => jobState(id), (s) => s === 'completed');
    const rows: unknown[] = await ctx.dataSource.query('SELECT id FROM runs WHERE id = $1', [id]);
    expect(rows).toEqual([]);
  });
});

describe('e-mail when a run finishes', () => {
  it('mails the author when the switch is on (finished and failed), and not when it is off', async () => {
    const author = await signUp(ctx.app, { name: 'Noor Haddad' });
    const on = await request(ctx.app).patch('/api/me').set(bearer(author.token)).send({ notifyOnRunDone: true });
    expect(on.body.notifyOnRunDone).toBe(true);

    const doneId = await postRun(ctx.app, author.token, diamondRun({ title: 'mail me' }, { count: 60 }));
    const mails = await waitUntil(() => ctx.mailTo(author.email), (list) => list.length === 1);
    expect(mails[0]!.subject).toBe('Tacet: run mail me finished');
    expect(mails[0]!.text).toContain(`${ctx.config.appUrl}/runs/${doneId}`);
    expect(mails[0]!.teamId).toBe(author.teamId);

    const failedId = await postRun(ctx.app, author.token, { ...diamondRun({}, { count: 60 }), title: undefined, subregion: emptySubregion });
    const afterFail = await waitUntil(() => ctx.mailTo(author.email), (list) => list.length === 2);
    expect(afterFail[0]!.subject).toBe(`Tacet: run ${failedId.slice(0, 8)} failed`);
    expect(afterFail[0]!.text).toMatch(/subregion holds 0 element/);

    await request(ctx.app).patch('/api/me').set(bearer(author.token)).send({ notifyOnRunDone: false });
    const quietId = await postRun(ctx.app, author.token, diamondRun({ title: 'quiet' }, { count: 60 }));
    await waitForRun(ctx.app, author.token, quietId);
    await waitUntil(() => jobState(quietId), (s) => s === 'completed');
    expect((await ctx.mailTo(author.email)).length).toBe(2);
  });
});
