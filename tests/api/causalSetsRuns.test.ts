import { readFileSync } from 'node:fs';
import type { Worker } from 'bullmq';
import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDetailSchema, runPointsSchema, type RunDetail } from '@shared/runs';
import { computeVacuum } from '../../server/engine/index';
import { continuumSpectrumFor } from '../../server/engine/regions';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';

/**
 * Runs on imported causal sets, through the API and the real worker (PostgreSQL, Redis, the engine
 * thread): a CSV of points made elsewhere must give the numbers the engine gives for the same points.
 */
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;
let outsider: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  researcher = await signUp(ctx.app);
  outsider = await signUp(ctx.app);
});
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

const auth = (user: SignedUpUser) => ({ Authorization: `Bearer ${user.token}` });

async function uploadCsv(app: Express, user: SignedUpUser, csv: Buffer | string, fields: Record<string, string>): Promise<string> {
  const req = request(app).post('/api/causal-sets').set(auth(user));
  for (const [k, v] of Object.entries(fields)) req.field(k, v);
  const res = await req.attach('file', Buffer.isBuffer(csv) ? csv : Buffer.from(csv), 'upload.csv');
  if (res.status !== 201) throw new Error(`upload answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

async function runToEnd(app: Express, user: SignedUpUser, body: object): Promise<RunDetail> {
  const posted = await request(app).post('/api/runs').set(auth(user)).send(body);
  if (posted.status !== 202) throw new Error(`POST /api/runs answered ${posted.status}: ${JSON.stringify(posted.body)}`);
  return waitForRun(app, user, posted.body.id as string);
}

async function waitForRun(app: Express, user: SignedUpUser, id: string): Promise<RunDetail> {
  const deadline = Date.now() + 45_000;
  for (;;) {
    const res = await request(app).get(`/api/runs/${id}`).set(auth(user));
    const run = runDetailSchema.parse(res.body);
    if (['done', 'failed', 'cancelled'].includes(run.status)) return run;
    if (Date.now() > deadline) throw new Error(`run ${id} still ${run.status} after 45 s`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Relative agreement; the API and the direct call run the same code on the same doubles. */
function expectSameNumbers(actual: ArrayLike<number>, expected: ArrayLike<number>, tolerance = 1e-12): void {
  expect(actual.length).toBe(expected.length);
  const scale = Math.max(...Array.from(expected, Math.abs));
  for (let k = 0; k < expected.length; k++) expect(Math.abs(actual[k] - expected[k])).toBeLessThanOrEqual(tolerance * scale);
}

// The reference sprinkling of server/engine/README.md §13: 300 points numpy placed in |t| + |x| ≤ √2 (the 2D
// diamond of proper time 2√2), and what numpy/LAPACK computed on them (fixtures/diamond300.ref.json).
const csv = readFileSync(new URL('../../fixtures/diamond300.csv', import.meta.url));
const reference = JSON.parse(readFileSync(new URL('../../fixtures/diamond300.ref.json', import.meta.url), 'utf8')) as {
  positive_eigs: number[];
  lam_cut: number;
  n_pos_above_cut: number;
  S_untruncated: number;
  S_double_truncated: number;
  n_sub: number;
};
const points = Float64Array.from(csv.toString('utf8').trim().split('\n').slice(1).flatMap((line) => line.split(',').map(Number)));
const region = { kind: 'diamond2d', properTime: 2 * Math.SQRT2 } as const;
const subregion = { kind: 'diamond', past: { t: -Math.SQRT1_2, x: 0 }, future: { t: Math.SQRT1_2, x: 0 } } as const;

describe('a vacuum run on an uploaded coordinates CSV', () => {
  let causalSetId: string;
  let doubleTruncatedRun: RunDetail;

  beforeAll(async () => {
    causalSetId = await uploadCsv(ctx.app, researcher, csv, { name: 'numpy diamond', kind: 'coordinates', region: JSON.stringify(region) });
  });

  it('gives the engine’s numbers for the same points: spectrum, cut, modes, entropy (double truncation)', async () => {
    doubleTruncatedRun = await runToEnd(ctx.app, researcher, {
      title: 'imported, doubly truncated',
      causalSetId,
      truncation: { rule: 'sqrtN' },
      subregion,
      doubleTruncation: true,
    });
    expect(doubleTruncatedRun.status).toBe('done');
    expect(doubleTruncatedRun).toMatchObject({ regionKind: 'imported', dimension: 2, N: 300, truncation: 'sqrtN' });
    const direct = await computeVacuum({ source: { kind: 'points', points, dimension: 2, region }, truncation: { rule: 'sqrtN' }, subregion, doubleTruncation: true });
    const result = doubleTruncatedRun.result!;
    expectSameNumbers(result.eigenvalues, direct.eigenvalues);
    expect(result.cutoff).toBe(direct.cutoff);
    expect(result.modesKept).toBe(direct.modesKept);
    expect(result.relations).toBe(direct.relations);
    expect(result.density).toBeCloseTo(direct.density!, 12);
    expect(result.entropy!.n).toBe(direct.entropy!.n);
    expect(result.entropy!.modesKept).toBe(direct.entropy!.modesKept);
    expect(Math.abs(result.entropy!.S / direct.entropy!.S - 1)).toBeLessThan(1e-10);
    expectSameNumbers(result.entropy!.generalizedEigenvalues, direct.entropy!.generalizedEigenvalues, 1e-9);
    // declared with a 2D diamond, the set gets the continuum a sprinkled run of that region gets (issue 18 §2);
    // (the region's continuum itself is checked against its closed form in the engine's tests)
    expect(result.continuum).toEqual(Array.from(continuumSpectrumFor('diamond2d', 300, result.eigenvalues.length)!));

    // and the numbers numpy/LAPACK computed on these points (fixtures/diamond300.ref.json, server/engine/README.md §13)
    expect(result.cutoff).toBeCloseTo(reference.lam_cut, 12);
    expect(result.modesKept).toBe(reference.n_pos_above_cut);
    expect(result.entropy!.n).toBe(reference.n_sub);
    expect(Math.abs(result.entropy!.S / reference.S_double_truncated - 1)).toBeLessThan(1e-8);
    const top = reference.positive_eigs[0];
    reference.positive_eigs.forEach((expected, k) => expect(Math.abs(result.eigenvalues[k] - expected)).toBeLessThan(1e-8 * expected + 1e-8 * top));
  });

  it('gives the engine’s untruncated entropy too', async () => {
    const run = await runToEnd(ctx.app, researcher, { causalSetId, truncation: { rule: 'none' }, subregion });
    expect(run.status).toBe('done');
    const direct = await computeVacuum({ source: { kind: 'points', points, dimension: 2, region }, truncation: { rule: 'none' }, subregion });
    expect(Math.abs(run.result!.entropy!.S / direct.entropy!.S - 1)).toBeLessThan(1e-10);
    expect(Math.abs(run.result!.entropy!.S / reference.S_untruncated - 1)).toBeLessThan(1e-8);
  });

  it('copies the points into the run, which stays reproducible after the causal set is deleted', async () => {
    const pointsRes = await request(ctx.app).get(`/api/runs/${doubleTruncatedRun.id}/points`).set(auth(researcher));
    const stored = runPointsSchema.parse(pointsRes.body);
    expect(stored.points.flat()).toEqual(Array.from(points));
    expect(stored.subregionElements).toHaveLength(reference.n_sub);
    expect(doubleTruncatedRun.request).toMatchObject({ causalSet: { id: causalSetId, name: 'numpy diamond', kind: 'coordinates', N: 300, region } });

    expect((await request(ctx.app).delete(`/api/causal-sets/${causalSetId}`).set(auth(researcher))).status).toBe(204);
    const again = await request(ctx.app).post(`/api/runs/${doubleTruncatedRun.id}/reanalyse`).set(auth(researcher)).send({});
    expect(again.status).toBe(202);
    const child = await waitForRun(ctx.app, researcher, again.body.id as string);
    expect(child.status).toBe('done');
    // the same numbers to rounding: OpenBLAS sums in another order when the worker's thread policy
    // picks another thread count (DEVELOPERS.md, thread policy), which moves the last digits only
    expect(Math.abs(child.result!.entropy!.S / doubleTruncatedRun.result!.entropy!.S - 1)).toBeLessThan(1e-12);
    expectSameNumbers(child.result!.eigenvalues, doubleTruncatedRun.result!.eigenvalues, 1e-13);
    // a new run on the deleted set is refused
    const gone = await request(ctx.app).post('/api/runs').set(auth(researcher)).send({ causalSetId });
    expect(gone.status).toBe(422);
    expect(gone.body.error.message).toMatch(/No imported causal set/);
  });
});

describe('runs on imported causal sets: inputs', () => {
  it('uses a given density for a massive field and matches the engine', async () => {
    const density = 300 / 4; // the diamond of proper time 2√2 has volume (2√2)²/2 = 4 (server/engine/README.md §2)
    const id = await uploadCsv(ctx.app, researcher, csv, { name: 'with density', kind: 'coordinates', density: String(density) });
    const run = await runToEnd(ctx.app, researcher, { causalSetId: id, mass: 1.5, truncation: { rule: 'sqrtN' } });
    expect(run.status).toBe('done');
    const direct = await computeVacuum({ source: { kind: 'points', points, dimension: 2, density }, mass: 1.5, truncation: { rule: 'sqrtN' } });
    expect(run.result!.density).toBe(density);
    expectSameNumbers(run.result!.eigenvalues, direct.eigenvalues);
  });

  it('refuses a causal set of another team and a subregion of the wrong dimension', async () => {
    const id = await uploadCsv(ctx.app, researcher, 't,x\n0,0\n0.5,0.1\n', { name: 'tiny', kind: 'coordinates', density: '1' });
    const other = await request(ctx.app).post('/api/runs').set(auth(outsider)).send({ causalSetId: id });
    expect(other.status).toBe(422);
    expect(other.body.error.message).toBe(`No imported causal set ${id} exists in this team.`);
    const wrong = await request(ctx.app)
      .post('/api/runs')
      .set(auth(researcher))
      .send({ causalSetId: id, subregion: { kind: 'diamond', past: { t: 0, x: 0, y: 0, z: 0 }, future: { t: 1, x: 0, y: 0, z: 0 } } });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.message).toMatch(/subregion tips must have 2 coordinates/);
  });
});

describe('a vacuum run on an uploaded relation list', () => {
  it('gives the numbers of the same set given by coordinates (2D massless, no density needed)', async () => {
    // the reference sprinkling's links, as a generator that knows only the order would write them
    const { causalMatrix, linkMatrix } = await import('../../server/engine/order');
    const rows = ['i,j'];
    linkMatrix(causalMatrix(points, 2)).forEach((i, j) => rows.push(`${i},${j}`));
    const id = await uploadCsv(ctx.app, researcher, rows.join('\n') + '\n', { name: 'diamond300 links', kind: 'relations', count: '300', dimension: '2' });
    const elements = { kind: 'elements' as const, indices: [0, 5, 9, 17, 23, 42, 57, 61, 88, 99, 120, 150, 151, 200, 222, 250, 299] };
    const run = await runToEnd(ctx.app, researcher, { causalSetId: id, truncation: { rule: 'sqrtN' }, subregion: elements });
    expect(run.status).toBe('done');
    expect(run).toMatchObject({ regionKind: 'imported', N: 300, dimension: 2 });
    const direct = await computeVacuum({ source: { kind: 'points', points, dimension: 2, region }, truncation: { rule: 'sqrtN' }, subregion: elements });
    expect(run.result!.relations).toBe(direct.relations);
    expect(run.result!.modesKept).toBe(direct.modesKept);
    const top = direct.eigenvalues[0];
    direct.eigenvalues.forEach((expected, k) => expect(Math.abs(run.result!.eigenvalues[k] - expected)).toBeLessThan(1e-7 * top));
    expect(Math.abs(run.result!.entropy!.S / direct.entropy!.S - 1)).toBeLessThan(1e-7);
    // and numpy's spectrum for these points (fixtures/diamond300.ref.json): the order alone fixes it
    reference.positive_eigs.forEach((expected, k) => expect(Math.abs(run.result!.eigenvalues[k] - expected)).toBeLessThan(1e-8 * expected + 1e-7 * top));

    // the run keeps its own copy: re-analysis works after the set is deleted
    expect((await request(ctx.app).delete(`/api/causal-sets/${id}`).set(auth(researcher))).status).toBe(204);
    const again = await request(ctx.app).post(`/api/runs/${run.id}/reanalyse`).set(auth(researcher)).send({ truncation: { rule: 'none' } });
    expect(again.status).toBe(202);
    const child = await waitForRun(ctx.app, researcher, again.body.id as string);
    expect(child.status).toBe('done');
    expectSameNumbers(child.result!.eigenvalues, run.result!.eigenvalues, 1e-13);
    expect(child.result!.modesKept).toBe(150);
  });

  it('needs a density for a massive field or 4D, and element lists for subregions', async () => {
    const id = await uploadCsv(ctx.app, researcher, '0,1\n1,2\n0,3\n', { name: 'small order', kind: 'relations', count: '4', dimension: '2' });
    const massive = await request(ctx.app).post('/api/runs').set(auth(researcher)).send({ causalSetId: id, mass: 1 });
    expect(massive.status).toBe(422);
    expect(massive.body.error.message).toMatch(/a massive field needs a density/);
    const diamond = await request(ctx.app)
      .post('/api/runs')
      .set(auth(researcher))
      .send({ causalSetId: id, subregion: { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 1, x: 0 } } });
    expect(diamond.status).toBe(422);
    expect(diamond.body.error.message).toMatch(/give the subregion as a list of elements/);
    const fourD = await uploadCsv(ctx.app, researcher, '0,1\n1,2\n', { name: '4D order', kind: 'relations', count: '3', dimension: '4' });
    const noDensity = await request(ctx.app).post('/api/runs').set(auth(researcher)).send({ causalSetId: fourD });
    expect(noDensity.status).toBe(422);
    expect(noDensity.body.error.message).toMatch(/4D Green function needs a density/);
  });

  it('runs a massive 4D relation list with a density like its coordinates', async () => {
    const { sprinkle } = await import('../../server/engine/sprinkle');
    const { causalMatrix, linkMatrix } = await import('../../server/engine/order');
    const s = sprinkle({ region: { kind: 'diamond4d', properTime: 2 }, process: 'fixed', count: 200, seed: 'api-4d-order', prng: 'arc4' });
    const rows: string[] = [];
    linkMatrix(causalMatrix(s.points, 4)).forEach((i, j) => rows.push(`${i},${j}`));
    const id = await uploadCsv(ctx.app, researcher, rows.join('\n'), { name: '4D links', kind: 'relations', count: '200', dimension: '4', density: String(s.density) });
    const run = await runToEnd(ctx.app, researcher, { causalSetId: id, mass: 1.2, truncation: { rule: 'none' } });
    expect(run.status).toBe('done');
    const direct = await computeVacuum({ source: { kind: 'points', points: s.points, dimension: 4, density: s.density }, mass: 1.2, truncation: { rule: 'none' } });
    expect(run.result!.links).toBe(direct.links);
    const top = direct.eigenvalues[0];
    direct.eigenvalues.forEach((expected, k) => expect(Math.abs(run.result!.eigenvalues[k] - expected)).toBeLessThan(1e-7 * top));
  });
});
