import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runEntropiesExportSchema } from '@shared/exports';
import { runDetailSchema, runPointsSchema, type RunDetail } from '@shared/runs';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { runPython } from '../support/python';
import { bearer, diamondRun, postRun, waitForRun } from '../worker/runHelpers';

/**
 * Runs with Rényi orders, a pair A, B for the mutual information and the complement check (issue 15,
 * server/engine/README.md §15), through the API, the real worker, PostgreSQL and Redis: stored in the
 * run's summary, answered by GET /api/runs/:id, carried by spectrum.json and a re-analysis; and every
 * request that can never succeed refused before anything is stored or queued.
 */
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;
let relationsId: string;

const centre = { kind: 'diamond', past: { t: -0.4, x: 0 }, future: { t: 0.4, x: 0 } } as const;
// the domains of dependence of x ∈ (−0.8, −0.2) and x ∈ (0.2, 0.8) on t = 0: disjoint and spacelike
const left = { kind: 'diamond', past: { t: -0.3, x: -0.5 }, future: { t: 0.3, x: -0.5 } } as const;
const right = { kind: 'diamond', past: { t: -0.3, x: 0.5 }, future: { t: 0.3, x: 0.5 } } as const;
const orders = [2, 0.5, 'inf', 3] as const;
const body = diamondRun(
  { title: 'entanglement', subregion: centre, doubleTruncation: true, renyi: orders, mutualInformation: { a: left, b: right }, complement: true },
  { count: 300, seed: 'issue-15' },
);

beforeAll(async () => {
  ctx = await createTestContext();
  researcher = await signUp(ctx.app);
  const upload = await request(ctx.app)
    .post('/api/causal-sets')
    .set(bearer(researcher.token))
    .field('name', 'six elements')
    .field('kind', 'relations')
    .field('count', '6')
    .field('dimension', '2')
    .attach('file', Buffer.from('i,j\n0,1\n1,2\n2,3\n0,4\n'), 'set.csv');
  if (upload.status !== 201) throw new Error(`upload answered ${upload.status}: ${JSON.stringify(upload.body)}`);
  relationsId = upload.body.id as string;
  worker = await startTestWorker(ctx);
}, 60_000);
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

/** S_α = Σ_{μ>1} ln(μ^α − (μ−1)^α)/(α − 1), S_∞ = Σ ln μ of a bosonic Gaussian state, in numpy (the published formula, evaluated outside the project). */
function renyiInNumpy(mu: number[], alphas: (number | 'inf')[]): Record<string, number> {
  return runPython<Record<string, number>>(
    `
import json, sys
import numpy as np
data = json.load(sys.stdin)
mu = np.array(data["mu"], dtype=float)
mu = mu[mu > 1]
out = {}
for a in data["alphas"]:
    if a == "inf":
        out["inf"] = float(np.sum(np.log(mu)))
    else:
        a = float(a)
        out[repr(a) if a != int(a) else str(int(a))] = float(np.sum(np.log(mu**a - (mu - 1)**a)) / (a - 1))
print(json.dumps(out))
`,
    { mu, alphas },
  );
}

describe('a run with Rényi orders, a pair and the complement check', () => {
  let run: RunDetail;

  beforeAll(async () => {
    const id = await postRun(ctx.app, researcher.token, body);
    run = (await waitForRun(ctx.app, researcher.token, id)).run;
    if (run.status !== 'done') throw new Error(`the run ended ${run.status}: ${run.error}`);
  }, 60_000);

  it('answers S_α, I(A:B) and the complement in the shape of shared/runs.ts', () => {
    expect(runDetailSchema.parse(run).result).not.toBeNull();
    const { entropy, mutualInformation, complement } = run.result!;
    expect(Object.keys(entropy!.renyi!).sort()).toEqual(['0.5', '2', '3', 'inf']);
    expect(mutualInformation).toBeTruthy();
    expect(complement).toBeTruthy();
  });

  it('gives S_α as numpy gives it from the same μ, non-increasing in α with S between S_0.5 and S_2', () => {
    const { entropy } = run.result!;
    const renyi = entropy!.renyi!;
    const reference = renyiInNumpy(entropy!.generalizedEigenvalues, [...orders]);
    for (const key of Object.keys(reference)) expect(renyi[key]).toBeCloseTo(reference[key]!, 9);
    // Rényi entropies are non-increasing in α, S_1 = S the von Neumann entropy (common practice)
    const ascending = [renyi['0.5']!, entropy!.S, renyi['2']!, renyi['3']!, renyi.inf!];
    for (let k = 1; k < ascending.length; k++) expect(ascending[k]!).toBeLessThanOrEqual(ascending[k - 1]! + 1e-12);
    expect(entropy!.S).toBeGreaterThan(0);
  });

  it('gives I = S_A + S_B − S_AB, each part with its own restricted cut √n/(4π) and n_A∪B = n_A + n_B', () => {
    const mi = run.result!.mutualInformation!;
    expect(mi.I).toBeCloseTo(mi.a.S + mi.b.S - mi.union.S, 12);
    expect(mi.union.n).toBe(mi.a.n + mi.b.n);
    for (const part of [mi.a, mi.b, mi.union]) {
      expect(part.restrictedCut).toEqual({ rule: 'sqrtN' });
      // the restricted cut of double truncation, √n/(4π) with the part's own n (Sorkin–Yazdi 2018; §15)
      expect(part.cutoff).toBeCloseTo(Math.sqrt(part.n) / (4 * Math.PI), 12);
    }
    // strong subadditivity's consequence for disjoint parts: I ≥ 0 for any state (common practice); the
    // truncated state need not satisfy it, so only a finite value is required here
    expect(Number.isFinite(mi.I)).toBe(true);
  });

  it('gives the complement with difference = S_O′ − S_O', () => {
    const { entropy, complement } = run.result!;
    expect(complement!.difference).toBeCloseTo(complement!.S - entropy!.S, 12);
    expect(complement!.n).toBeGreaterThan(0);
    expect(complement!.n + entropy!.n).toBeLessThanOrEqual(run.result!.N);
  });

  it('marks A and B on the points, as many elements as the engine counted', async () => {
    const res = await request(ctx.app).get(`/api/runs/${run.id}/points`).set(bearer(researcher.token));
    expect(res.status).toBe(200);
    const points = runPointsSchema.parse(res.body);
    const mi = run.result!.mutualInformation!;
    expect(points.pairElements!.a.length).toBe(mi.a.n);
    expect(points.pairElements!.b.length).toBe(mi.b.n);
    for (const i of points.pairElements!.a) expect(points.points[i]![1]!).toBeLessThan(0);
    for (const i of points.pairElements!.b) expect(points.points[i]![1]!).toBeGreaterThan(0);
  });

  it('carries S_α, the pair and the complement in spectrum.json', async () => {
    const res = await request(ctx.app).get(`/api/runs/${run.id}/spectrum.json`).set(bearer(researcher.token));
    expect(res.status).toBe(200);
    const entropies = runEntropiesExportSchema.parse(JSON.parse(res.text).entropies);
    const { entropy, mutualInformation: mi, complement } = run.result!;
    expect(entropies.rule).toBe('double-truncated (state √N/(4π), restricted √n/(4π))');
    expect(entropies.subregion).toMatchObject({ S: entropy!.S, n: entropy!.n, renyi: entropy!.renyi });
    expect(entropies.mutualInformation).toMatchObject({ SA: mi!.a.S, SB: mi!.b.S, SAB: mi!.union.S, I: mi!.I, nA: mi!.a.n, nB: mi!.b.n, nAB: mi!.union.n });
    expect(entropies.mutualInformation!.cuts.AB).toEqual({ rule: '√n/(4π)', cutoff: mi!.union.cutoff, modesKept: mi!.union.modesKept });
    expect(entropies.complement).toMatchObject({ SO: entropy!.S, SOprime: complement!.S, nO: entropy!.n, nOprime: complement!.n, difference: complement!.difference });
  });

  it('carries the orders, pair and complement into a re-analysis, and drops what is cleared', async () => {
    const carried = await request(ctx.app).post(`/api/runs/${run.id}/reanalyse`).set(bearer(researcher.token)).send({ truncation: { rule: 'lambda', cut: 0.2 } });
    expect(carried.status).toBe(202);
    const cleared = await request(ctx.app).post(`/api/runs/${run.id}/reanalyse`).set(bearer(researcher.token)).send({ renyi: null, mutualInformation: null, complement: false });
    expect(cleared.status).toBe(202);
    const child = (await waitForRun(ctx.app, researcher.token, carried.body.id)).run;
    expect(child.status, child.error ?? '').toBe('done');
    expect(child.request).toMatchObject({ renyi: orders, mutualInformation: { a: left, b: right }, complement: true });
    // the same points: A, B and the complement hold the same elements under another cut
    expect(child.result!.mutualInformation!.a.n).toBe(run.result!.mutualInformation!.a.n);
    expect(child.result!.complement!.n).toBe(run.result!.complement!.n);
    const plain = (await waitForRun(ctx.app, researcher.token, cleared.body.id)).run;
    expect(plain.status, plain.error ?? '').toBe('done');
    expect(plain.request).not.toHaveProperty('renyi');
    expect(plain.request).not.toHaveProperty('mutualInformation');
    expect(plain.result!.entropy!.renyi ?? null).toBeNull();
    expect(plain.result!.mutualInformation ?? null).toBeNull();
    expect(plain.result!.complement ?? null).toBeNull();
    const json = await request(ctx.app).get(`/api/runs/${plain.id}/spectrum.json`).set(bearer(researcher.token));
    expect(JSON.parse(json.text)).not.toHaveProperty('entropies');
  }, 60_000);
});

/** Rows of runs and jobs in the queue, to show a refused request stored and queued nothing. */
async function stored(): Promise<{ runs: number; jobs: number }> {
  const runs = Number((await ctx.dataSource.query('SELECT count(*) AS n FROM runs'))[0].n);
  const jobs = Object.values(await ctx.computeQueue.getJobCounts()).reduce((a, b) => a + b, 0);
  return { runs, jobs };
}

describe('refusals before anything is stored or queued', () => {
  type Case = [name: string, body: () => Record<string, unknown>, status: 400 | 422, field: string, message: RegExp];
  const overlapping = { kind: 'diamond', past: { t: -0.3, x: 0.3 }, future: { t: 0.3, x: 0.3 } } as const;
  // just above A's future tip, so every element of A precedes every element of this one
  const later = { kind: 'diamond', past: { t: 0.32, x: -0.5 }, future: { t: 0.46, x: -0.5 } } as const;
  const cases: Case[] = [
    ['A and B overlap', () => (diamondRun({ mutualInformation: { a: centre, b: overlapping } })), 422, 'mutualInformation', /overlap/],
    ['A and B causally related', () => (diamondRun({ mutualInformation: { a: left, b: later } })), 422, 'mutualInformation', /causally related/],
    ['α = 0', () => (diamondRun({ subregion: centre, renyi: [0] })), 400, 'renyi.0', /α must be > 0/],
    ['α < 0', () => (diamondRun({ subregion: centre, renyi: [2, -1] })), 400, 'renyi.1', /α must be > 0/],
    ['nine α', () => (diamondRun({ subregion: centre, renyi: [0.5, 2, 3, 4, 5, 6, 7, 8, 9] })), 400, 'renyi', /at most 8 Rényi orders/],
    ['a pair of diamonds on a relation list', () => ({ causalSetId: relationsId, mutualInformation: { a: left, b: right } }), 422, 'mutualInformation.a', /element|relation/],
  ];
  for (const [name, requestBody, status, field, message] of cases) {
    it(name, async () => {
      const before = await stored();
      const res = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(requestBody());
      expect(res.status, JSON.stringify(res.body)).toBe(status);
      const issue = (res.body.error.issues as { path: string; message: string }[]).find((i) => i.path === field || i.path.startsWith(`${field}.`));
      expect(issue, JSON.stringify(res.body.error)).toBeDefined();
      expect(issue!.message).toMatch(message);
      expect(await stored()).toEqual(before);
    });
  }

  it('refuses a re-analysis whose pair overlaps, storing nothing', async () => {
    const parentId = await postRun(ctx.app, researcher.token, diamondRun({}, { count: 80 }));
    const parent = (await waitForRun(ctx.app, researcher.token, parentId)).run;
    expect(parent.status).toBe('done');
    const before = await stored();
    const res = await request(ctx.app).post(`/api/runs/${parentId}/reanalyse`).set(bearer(researcher.token)).send({ mutualInformation: { a: centre, b: overlapping } });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.error.issues[0].path).toMatch(/^mutualInformation/);
    expect(await stored()).toEqual(before);
  }, 60_000);
});
