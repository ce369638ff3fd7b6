import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { studyDetailSchema, studyListResponseSchema, type StudyDetail } from '@shared/studies';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import { bearer, parseCsv, waitUntil } from '../worker/runHelpers';

/** A pair study with Rényi orders through the API, PostgreSQL, Redis and the real worker; and the refusals. */
let ctx: TestContext;
let worker: Worker | null = null;
let researcher: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  researcher = await signUp(ctx.app, { name: 'Ines Varga' });
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const pairStudy = (overrides: Record<string, unknown> = {}) => ({
  title: 'mutual information decay',
  counts: [300],
  seeds: ['p-1', 'p-2', 'p-3'],
  subregions: { kind: 'pairs', sizes: [0.25], separations: [0.03, 0.08, 0.2] },
  rules: [{ truncation: { rule: 'none' } }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
  renyi: [2, 'inf'],
  ...overrides,
});

const post = (body: object) => request(ctx.app).post('/api/studies').set(bearer(researcher.token)).send(body);
const studyCount = async () => studyListResponseSchema.parse((await request(ctx.app).get('/api/studies').set(bearer(researcher.token))).body).items.length;

async function getStudy(id: string): Promise<StudyDetail> {
  const res = await request(ctx.app).get(`/api/studies/${id}`).set(bearer(researcher.token));
  if (res.status !== 200) throw new Error(`GET /api/studies/${id} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return studyDetailSchema.parse(res.body);
}

describe('bad Rényi orders and pairs are refused before anything is stored', () => {
  it('names the field: α ≤ 0, α = 1, more than 8 orders, a pair that does not fit, too few elements', async () => {
    const before = await studyCount();
    // schema issues answer 400 with the field's path, as every malformed study body does
    const negative = await post(pairStudy({ renyi: [2, -1] }));
    expect(negative.status).toBe(400);
    expect(negative.body.error.issues[0]).toMatchObject({ path: 'renyi.1', message: 'a Rényi order α must be > 0' });
    const zero = await post(pairStudy({ renyi: [0] }));
    expect(zero.body.error.issues[0]).toMatchObject({ path: 'renyi.0', message: 'a Rényi order α must be > 0' });
    const one = await post(pairStudy({ renyi: [1] }));
    expect(one.body.error.issues[0].message).toMatch(/α = 1 is the von Neumann entropy/);
    const nine = await post(pairStudy({ renyi: [0.5, 2, 3, 4, 5, 6, 7, 8, 9] }));
    expect(nine.status).toBe(400);
    expect(nine.body.error.issues[0]).toMatchObject({ path: 'renyi', message: 'at most 8 Rényi orders' });
    // plan problems answer 422 with the field's path
    const wide = await post(pairStudy({ subregions: { kind: 'pairs', sizes: [0.4], separations: [0.1, 0.3] } }));
    expect(wide.status).toBe(422);
    expect(wide.body.error.issues[0].path).toBe('subregions.separations.1');
    expect(wide.body.error.message).toMatch(/does not fit in the region's diamond/);
    const small = await post(pairStudy({ counts: [100], subregions: { kind: 'pairs', sizes: [0.3, 0.1], separations: [0.05] } }));
    expect(small.status).toBe(422);
    expect(small.body.error.issues[0].path).toBe('subregions.sizes.1');
    expect(await studyCount()).toBe(before);
  });
});

describe('a small pair study with Rényi orders', () => {
  it('completes with ⟨I⟩ ± SE per separation, log-log fits beside the continuum trend, and exports that carry them', async () => {
    const res = await post(pairStudy());
    expect(res.status).toBe(202);
    const id = res.body.id as string;
    const done = await waitUntil(() => getStudy(id), (s) => ['done', 'failed', 'cancelled'].includes(s.status), 120_000);
    expect(done.status).toBe('done');
    expect(done.subregions.map((s) => s.key)).toEqual(['pair l/L=0.25 d/L=0.03', 'pair l/L=0.25 d/L=0.08', 'pair l/L=0.25 d/L=0.2']);
    // 3 separations × 2 rules, each over 3 seeds
    expect(done.aggregates).toHaveLength(6);
    for (const a of done.aggregates) {
      expect(a.seeds).toBe(3);
      expect(a.pair).toMatchObject({ size: 0.25 });
      expect(a.pair!.seI).not.toBeNull();
      expect(Object.keys(a.renyi!)).toEqual(['2', 'inf']);
      expect(Object.keys(a.pair!.renyiI!)).toEqual(['2', 'inf']);
      // A∪B holds about 2 (ℓ/T)² N = 37.5 elements on average (volume ratio of two diamonds of ℓ/T = 0.25)
      expect(a.meanN).toBeGreaterThan(0.5 * 37.5);
      expect(a.meanN).toBeLessThan(1.6 * 37.5);
    }
    // untruncated: subadditivity makes every I ≥ 0 (common practice), and I falls from d/T = 0.03 to 0.2
    const untruncated = done.aggregates.filter((a) => a.rule === 'none').sort((p, q) => p.pair!.separation - q.pair!.separation);
    for (const a of untruncated) expect(a.pair!.meanI).toBeGreaterThan(0);
    expect(untruncated[2]!.pair!.meanI).toBeLessThan(untruncated[0]!.pair!.meanI);
    const fit = done.fits.find((f) => f.model === 'loglog' && f.rule === 'none')!;
    expect(fit).toMatchObject({ quantity: 'I', size: 0.25, N: 300, points: 3, excluded: 0 });
    expect(fit.slope).toBeLessThan(0);
    expect(fit.continuum).toMatchObject({ from: 0.03, to: 0.2 });
    expect(fit.continuum!.slope).toBeLessThan(0);

    const csv = await request(ctx.app).get(`/api/studies/${id}/export?format=csv`).set(bearer(researcher.token));
    expect(csv.status).toBe(200);
    const table = parseCsv(csv.text);
    expect(table.header).toEqual(expect.arrayContaining(['S_alpha_2', 'S_alpha_inf', 'S_A', 'S_B', 'S_AB', 'I', 'n_A', 'n_B', 'I_alpha_2']));
    expect(table.rows).toHaveLength(3 * 3 * 2);
    const latex = await request(ctx.app).get(`/api/studies/${id}/export?format=latex`).set(bearer(researcher.token));
    expect(latex.text).toContain('mutual-information-fits');
    const methods = await request(ctx.app).get(`/api/studies/${id}/export?format=methods`).set(bearer(researcher.token));
    expect(methods.text).toMatch(/measured slope [−-]?[0-9.]+ ± [0-9.]+ against continuum trend [−-][0-9.]+ over d\/T ∈ \[0\.03, 0\.2\]/);
  }, 150_000);

  it('gives concentric sub-diamonds S_α beside S, with fits of each S_α against ln √n', async () => {
    const res = await post({
      title: 'Rényi scaling',
      counts: [120, 240],
      seeds: ['r-1', 'r-2'],
      subregions: { kind: 'concentric', fractions: [0.5, 0.7] },
      rules: [{ truncation: { rule: 'none' } }],
      renyi: ['inf', 0.5, 2],
    });
    expect(res.status).toBe(202);
    const done = await waitUntil(() => getStudy(res.body.id as string), (s) => ['done', 'failed', 'cancelled'].includes(s.status), 120_000);
    expect(done.status).toBe('done');
    for (const a of done.aggregates) {
      expect(Object.keys(a.renyi!).sort()).toEqual(['0.5', '2', 'inf']);
      // S_0.5 ≥ S ≥ S_2 ≥ S_∞ (Rényi entropies fall with α, common practice)
      expect(a.renyi!['0.5']!.mean).toBeGreaterThanOrEqual(a.meanS);
      expect(a.meanS).toBeGreaterThanOrEqual(a.renyi!['2']!.mean);
      expect(a.renyi!['2']!.mean).toBeGreaterThanOrEqual(a.renyi!.inf!.mean);
    }
    expect(done.fits.filter((f) => f.model === 'log' && f.subregion === null).map((f) => f.quantity)).toEqual(['S', 'renyi:0.5', 'renyi:2', 'renyi:inf']);
    const csv = parseCsv((await request(ctx.app).get(`/api/studies/${done.id}/export?format=aggregates-csv`).set(bearer(researcher.token))).text);
    expect(csv.header.filter((h) => h.startsWith('mean_S_alpha'))).toEqual(['mean_S_alpha_0.5', 'mean_S_alpha_2', 'mean_S_alpha_inf']);
  }, 150_000);
});
