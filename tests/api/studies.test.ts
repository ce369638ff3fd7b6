import type { Job, Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { studyDetailSchema, studyListResponseSchema, type StudyDetail } from '@shared/studies';
import { computeStudyCell } from '../../server/studies/cell';
import { resolveSubregions } from '../../server/studies/plan';
import { studyCellJobId } from '../../server/queue/jobs';
import { studyCellHandler } from '../../server/worker/handlers/studyCell';
import { sweepOrphanedWork } from '../../server/worker/recovery';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { bearer, parseCsv, waitUntil } from '../worker/runHelpers';

/** Scaling studies through the API, PostgreSQL, Redis and the real worker (in this process). */
let ctx: TestContext;
let worker: Worker | null = null;
let researcher: SignedUpUser;
let stranger: SignedUpUser;

const startWorker = () => startTestWorker(ctx);

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startWorker();
  researcher = await signUp(ctx.app, { name: 'Noor Abernethy' });
  stranger = await signUp(ctx.app, { name: 'Other Team' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const rules = [{ truncation: { rule: 'none' } }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }];
const tinyStudy = (overrides: Record<string, unknown> = {}) => ({
  title: 'tiny scaling study',
  counts: [160, 80],
  seeds: ['s-1', 's-2'],
  subregions: { kind: 'concentric', fractions: [0.5, 0.7] },
  rules,
  ...overrides,
});

async function postStudy(body: object, token = researcher.token): Promise<string> {
  const res = await request(ctx.app).post('/api/studies').set(bearer(token)).send(body);
  if (res.status !== 202) throw new Error(`POST /api/studies answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

async function getStudy(id: string): Promise<StudyDetail> {
  const res = await request(ctx.app).get(`/api/studies/${id}`).set(bearer(researcher.token));
  if (res.status !== 200) throw new Error(`GET /api/studies/${id} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return studyDetailSchema.parse(res.body);
}

const finished = (s: StudyDetail) => ['done', 'failed', 'cancelled'].includes(s.status);

describe('study requests that cannot be computed', () => {
  it('answers 400 with the field for a bad grid, 422 beyond the dense limit', async () => {
    const post = (body: object) => request(ctx.app).post('/api/studies').set(bearer(researcher.token)).send(body);
    const empty = await post(tinyStudy({ counts: [] }));
    expect(empty.status).toBe(400);
    expect(empty.body.error.issues[0]).toMatchObject({ path: 'counts', message: 'give at least one N' });

    const tooSmall = await post(tinyStudy({ counts: [40], subregions: { kind: 'concentric', fractions: [0.2, 0.5] } }));
    expect(tooSmall.status).toBe(422);
    expect(tooSmall.body.error.issues[0].path).toBe('subregions.fractions.0');
    expect(tooSmall.body.error.message).toMatch(/about 1\.6 elements at N = 40/);

    const slab = await post(tinyStudy({ region: { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 1 } }));
    expect(slab.status).toBe(422);
    expect(slab.body.error.message).toMatch(/concentric sub-diamonds need a diamond region/);

    const outside = await post(tinyStudy({ subregions: { kind: 'tips', diamonds: [{ past: { t: 0, x: 0 }, future: { t: 3, x: 0 } }] } }));
    expect(outside.status).toBe(422);
    expect(outside.body.error.issues[0]).toMatchObject({ path: 'subregions.diamonds.0.future', message: expect.stringMatching(/future tip .* lies outside the diamond2d region/) });

    const huge = await post(tinyStudy({ counts: [200, 100_000] }));
    expect(huge.status).toBe(422);
    expect(huge.body.error.code).toBe('too_large');
    expect(huge.body.error.message).toMatch(/N = 100000: .*exceeds the dense limit/);

    const duplicateRules = await post(tinyStudy({ rules: [{ truncation: { rule: 'none' } }, { truncation: { rule: 'none' }, doubleTruncation: false }] }));
    expect(duplicateRules.status).toBe(400);
    expect(duplicateRules.body.error.message).toMatch(/cut rules must differ/);
  });
});

describe('a tiny study from POST to exports', () => {
  let id: string;
  let done: StudyDetail;

  it('runs every (N, seed) cell through the worker and ends done with aggregates and fits', async () => {
    id = await postStudy(tinyStudy());
    const first = await getStudy(id);
    expect(first.progress.total).toBe(4);
    expect(first.counts).toEqual([80, 160]);
    expect(first.cells.map((c) => [c.N, c.seed])).toEqual([[80, 's-1'], [80, 's-2'], [160, 's-1'], [160, 's-2']]);
    const seenPercents: number[] = [];
    done = await waitUntil(
      async () => {
        const s = await getStudy(id);
        seenPercents.push(s.progress.percent);
        return s;
      },
      finished,
      60_000,
    );
    expect(done.status).toBe('done');
    expect(done.error).toBeNull();
    expect(done.progress).toMatchObject({ done: 4, failed: 0, cancelled: 0, total: 4, percent: 100 });
    for (let k = 1; k < seenPercents.length; k++) expect(seenPercents[k]).toBeGreaterThanOrEqual(seenPercents[k - 1]!);
    // 2 N × 2 sub-diamonds × 2 rules, each over 2 seeds
    expect(done.aggregates).toHaveLength(8);
    for (const a of done.aggregates) {
      expect(a.seeds).toBe(2);
      expect(a.seS).not.toBeNull();
      // a concentric diamond of ℓ/T = f holds the fraction f² of the region's volume (server/engine/README.md §2)
      expect(a.meanN / a.N).toBeGreaterThan(0.5 * a.fraction! ** 2);
      expect(a.meanN / a.N).toBeLessThan(1.6 * a.fraction! ** 2);
    }
    // per rule: the fit over all four aggregates; one sub-diamond across two N would be a two-point line,
    // which is not fitted (server/studies/aggregate.ts FIT_MIN_POINTS)
    expect(done.fits.filter((f) => f.rule === 'sqrtN+double' && f.model === 'log').map((f) => f.subregion)).toEqual([null]);
    expect(done.spectra.map((s) => [s.N, s.seed])).toEqual([[80, 's-1'], [160, 's-1']]);
    expect(done.spectra[1]!.cuts).toEqual([{ rule: 'sqrtN+double', cutoff: Math.sqrt(160) / (4 * Math.PI) }]);
    expect(done.ruleLabels).toEqual({ none: 'untruncated', 'sqrtN+double': 'double-truncated (state √N/(4π), restricted √n/(4π))' });
    // a 2D study with these rules needs no caution
    expect(done.cautions).toEqual([]);
    expect(done.backends.length).toBe(1);
    expect(done.engineVersion).toMatch(/^tacet-engine/);
  });

  it('stores exactly what the engine gives for a cell (same seed, same numbers)', async () => {
    const region = { kind: 'diamond2d', properTime: 2 } as const;
    const direct = await computeStudyCell({
      sprinkling: { region, count: 160, seed: 's-2' },
      mass: 0,
      subregions: resolveSubregions({ region, subregions: { kind: 'concentric', fractions: [0.5, 0.7] } }),
      rules: [{ truncation: { rule: 'none' }, doubleTruncation: false }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
      backend: done.backends[0] as 'native' | 'ml-matrix',
    });
    const csv = await request(ctx.app).get(`/api/studies/${id}/export?format=csv`).set(bearer(researcher.token));
    const { header, rows } = parseCsv(csv.text);
    const col = (name: string) => header.indexOf(name);
    const mine = rows.filter((r) => r[col('N')] === '160' && r[col('seed')] === 's-2');
    expect(mine).toHaveLength(4);
    for (const e of direct.entropies) {
      const row = mine.find((r) => r[col('subregion')] === e.subregion && r[col('rule')] === e.rule)!;
      expect(Number(row[col('S')])).toBe(e.S);
      expect(Number(row[col('n')])).toBe(e.n);
    }
  });

  it('exports tidy and aggregate CSV, LaTeX, JSON provenance, BibTeX and a methods paragraph', async () => {
    const get = (format: string) => request(ctx.app).get(`/api/studies/${id}/export?format=${format}`).set(bearer(researcher.token));
    const tidy = await get('csv');
    expect(tidy.status).toBe(200);
    expect(tidy.headers['content-type']).toMatch(/text\/csv/);
    expect(tidy.headers['content-disposition']).toContain(`tacet-study-${id.slice(0, 8)}-entropies.csv`);
    expect(parseCsv(tidy.text).rows).toHaveLength(16);

    const aggregates = parseCsv((await get('aggregates-csv')).text);
    expect(aggregates.header).toEqual(['N', 'subregion', 'l_over_L', 'rule', 'state_rule', 'restricted_cut', 'seeds', 'mean_elements', 'mean_n', 'mean_S', 'sd_S', 'se_S']);
    // each row spells out its two cuts: the whole-region rule and the restricted cut of double truncation
    const cuts = new Set(aggregates.rows.map((r) => `${r[3]}|${r[4]}|${r[5]}`));
    expect(cuts).toEqual(new Set(['none|none|none', 'sqrtN+double|sqrtN|sqrtN']));
    expect(aggregates.rows).toHaveLength(8);

    const latex = (await get('latex')).text;
    expect(latex).toContain('\\toprule');
    expect(latex).toContain('tiny scaling study');
    expect(latex.match(/\\begin\{table\}/g)).toHaveLength(2);

    const json = JSON.parse((await get('json')).text);
    expect(json.seeds).toEqual(['s-1', 's-2']);
    expect(json.engine.versions[0]).toMatch(/^tacet-engine/);
    expect(json.cells).toHaveLength(4);
    expect(json.cells[0].timings.spectrum).toBeGreaterThan(0);
    expect(json.cells[0].startedAt).toMatch(/^\d{4}-/);
    expect(json.references).toContain('sorkin2018');

    const bib = (await get('bibtex')).text;
    expect(bib.match(/^@(article|misc)\{/gm)!.length).toBe(json.references.length);

    const methods = (await get('methods')).text;
    expect(methods).toMatch(/finite-size/);
    expect(methods).toMatch(/modelling choice/);
    expect(methods).toMatch(/ensemble means over 2 sprinklings/);

    expect((await get('pdf')).status).toBe(400);
  });

  it('lists the study, hides it from other teams and deletes it', async () => {
    const list = studyListResponseSchema.parse((await request(ctx.app).get('/api/studies').set(bearer(researcher.token))).body);
    expect(list.items.map((s) => s.id)).toContain(id);
    expect((await request(ctx.app).get(`/api/studies/${id}`).set(bearer(stranger.token))).status).toBe(404);
    expect((await request(ctx.app).get(`/api/studies/${id}/export?format=csv`).set(bearer(stranger.token))).status).toBe(404);
    expect((await request(ctx.app).post(`/api/studies/${id}/cancel`).set(bearer(researcher.token))).status).toBe(409);
    expect((await request(ctx.app).delete(`/api/studies/${id}`).set(bearer(stranger.token))).status).toBe(404);
    expect((await request(ctx.app).delete(`/api/studies/${id}`).set(bearer(researcher.token))).status).toBe(204);
    expect((await request(ctx.app).get(`/api/studies/${id}`).set(bearer(researcher.token))).status).toBe(404);
  });
});

describe('studies on the other regions the form offers', () => {
  it('computes a 4D diamond (concentric, ℓ/T⁴ of the volume), a cylinder diamond and a slab (by tips)', async () => {
    const ids = await Promise.all([
      postStudy(tinyStudy({ title: '4D', region: { kind: 'diamond4d', properTime: 2 }, counts: [150], subregions: { kind: 'concentric', fractions: [0.7] } })),
      postStudy(tinyStudy({ title: 'cylinder', region: { kind: 'cylinder2d', properTime: 2, circumference: 1.5 }, counts: [120], subregions: { kind: 'tips', diamonds: [{ past: { t: -0.5, x: 0.2 }, future: { t: 0.5, x: 0.2 } }] } })),
      postStudy(tinyStudy({ title: 'slab', region: { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 2 }, counts: [120], subregions: { kind: 'tips', diamonds: [{ past: { t: 0, x: 1 }, future: { t: 1, x: 1 } }] } })),
    ]);
    const [fourD, cylinder, slab] = await Promise.all(ids.map((id) => waitUntil(() => getStudy(id), finished, 60_000)));
    for (const study of [fourD, cylinder, slab]) {
      expect(study!.status).toBe('done');
      expect(study!.aggregates.every((a) => a.seeds === 2 && Number.isFinite(a.meanS))).toBe(true);
    }
    // a concentric 4D diamond of ℓ/T = f holds f⁴ of the volume, πτ⁴/24 scaling (server/engine/README.md §2)
    for (const a of fourD!.aggregates) expect(a.meanN / a.N).toBeGreaterThan(0.5 * 0.7 ** 4);
    for (const a of fourD!.aggregates) expect(a.meanN / a.N).toBeLessThan(1.6 * 0.7 ** 4);
    // the slab's sub-diamond (t from 0 to 1 at x = 1) holds half the slab's area of 2: a quarter of N
    for (const a of slab!.aggregates) expect(a.meanN / a.N).toBeGreaterThan(0.15);
    for (const a of slab!.aggregates) expect(a.meanN / a.N).toBeLessThan(0.35);
  }, 120_000);
});

describe('cancelling and restarting', () => {
  it('cancels a study: queued cells never run, the running one stops, cancel again is 409', async () => {
    const id = await postStudy(tinyStudy({ title: 'to cancel', counts: [200], seeds: ['c1', 'c2', 'c3', 'c4', 'c5', 'c6'] }));
    const res = await request(ctx.app).post(`/api/studies/${id}/cancel`).set(bearer(researcher.token));
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('cancelled');
    expect(res.body.cancelRequested).toBe(true);
    const settled = await waitUntil(() => getStudy(id), (s) => s.cells.every((c) => c.status !== 'queued' && c.status !== 'running'), 30_000);
    expect(settled.status).toBe('cancelled');
    expect(settled.cells.filter((c) => c.status === 'done').length).toBeLessThanOrEqual(1);
    expect((await request(ctx.app).post(`/api/studies/${id}/cancel`).set(bearer(researcher.token))).status).toBe(409);
  });

  it('survives a worker restart: queued jobs wait in Redis, a new worker finishes the study', async () => {
    await worker!.close();
    worker = null;
    const id = await postStudy(tinyStudy({ title: 'restart', counts: [120], seeds: ['r1', 'r2', 'r3', 'r4'], subregions: { kind: 'concentric', fractions: [0.5] } }));
    const first = await startWorker();
    await waitUntil(() => getStudy(id), (s) => s.progress.done >= 1, 30_000);
    await first.close(); // lets the current cell finish, takes no further job
    const between = await getStudy(id);
    expect(between.status).toBe('running');
    expect(between.cells.some((c) => c.status === 'queued')).toBe(true);
    const doneBefore = between.cells.filter((c) => c.status === 'done').map((c) => c.id);
    worker = await startWorker();
    const end = await waitUntil(() => getStudy(id), finished, 30_000);
    expect(end.status).toBe('done');
    expect(end.progress.done).toBe(4);
    expect(end.aggregates.every((a) => a.seeds === 4)).toBe(true);
    // cells finished before the restart were not computed again
    const later = await ctx.dataSource.query(`SELECT id, finished_at FROM study_cells WHERE id = ANY($1::uuid[])`, [doneBefore]);
    expect(later).toHaveLength(doneBefore.length);
  });

  it('takes up a cell left running by a worker that died (a stalled job delivered again)', async () => {
    await worker!.close();
    worker = null;
    const id = await postStudy(tinyStudy({ title: 'crashed', counts: [100], seeds: ['x1'], subregions: { kind: 'concentric', fractions: [0.6] } }));
    const cell = (await getStudy(id)).cells[0]!;
    // as if a worker had claimed the cell and died: the row says running, the job is back in the queue
    await ctx.dataSource.query(`UPDATE study_cells SET status = 'running', started_at = now() WHERE id = $1`, [cell.id]);
    await ctx.dataSource.query(`UPDATE studies SET status = 'running' WHERE id = $1`, [id]);
    const job = await ctx.computeQueue.getJob(studyCellJobId(cell.id));
    expect(job).toBeDefined();
    const progress: unknown[] = [];
    const fake = { data: job!.data, updateProgress: async (p: unknown) => void progress.push(p) } as unknown as Job;
    const outcome = await studyCellHandler(fake, { config: ctx.config, dataSource: ctx.dataSource, mailer: ctx.mailer });
    expect(outcome).toMatchObject({ cellId: cell.id, entropies: 2 });
    expect(progress.length).toBeGreaterThan(0);
    const end = await getStudy(id);
    expect(end.status).toBe('done');
    expect(end.aggregates).toHaveLength(2);
    await job!.remove();
    worker = await startWorker();
  });

  it('the sweep fails cells whose jobs are gone, leaves live ones, and closes the study once all have ended', async () => {
    await worker!.close();
    worker = null;
    const id = await postStudy(tinyStudy({ title: 'orphaned cells', counts: [90], seeds: ['o1', 'o2', 'o3'], subregions: { kind: 'concentric', fractions: [0.6] } }));
    const [lostRunning, lostQueued, alive] = (await getStudy(id)).cells;
    // as if a worker died holding one cell and Redis then lost the jobs of two
    await ctx.dataSource.query(`UPDATE study_cells SET status = 'running', started_at = now() WHERE id = $1`, [lostRunning!.id]);
    for (const cell of [lostRunning!, lostQueued!]) await (await ctx.computeQueue.getJob(studyCellJobId(cell.id)))!.remove();
    const report = await sweepOrphanedWork({ dataSource: ctx.dataSource, queue: ctx.computeQueue, graceMs: 0 });
    expect(report.cells.sort()).toEqual([lostRunning!.id, lostQueued!.id].sort());
    const swept = await getStudy(id);
    for (const cellId of [lostRunning!.id, lostQueued!.id]) {
      const cell = swept.cells.find((c) => c.id === cellId)!;
      expect(cell.status).toBe('failed');
      expect(cell.error).toMatch(/no longer in the queue/);
    }
    // the third cell's job is still waiting: untouched, and the study stays open for it
    expect(swept.cells.find((c) => c.id === alive!.id)!.status).toBe('queued');
    expect(['queued', 'running']).toContain(swept.status);
    worker = await startWorker();
    const end = await waitUntil(() => getStudy(id), finished, 30_000);
    expect(end.status).toBe('failed');
    expect(end.cells.find((c) => c.id === alive!.id)!.status).toBe('done');
    // subject and body say the same thing: the study finished, with failed cells
    const mails = await waitUntil(() => ctx.mailTo(researcher.email), (list) => list.some((m) => m.subject.includes('orphaned cells')), 10_000);
    const mail = mails.find((m) => m.subject.includes('orphaned cells'))!;
    expect(mail.subject).toBe('Tacet: study orphaned cells finished with failed cells');
    expect(mail.text).toContain('has finished with failed cells');
    expect(mail.text).toContain('because study e-mails are switched on');
  });
});
