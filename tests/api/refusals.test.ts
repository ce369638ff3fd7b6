import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sprinkle } from '../../server/engine/sprinkle';
import { createTestContext, signUp, type SignedUpUser, type TestContext, startTestWorker } from '../support/app';
import { bearer, diamondRun, postRun, waitForRun } from '../worker/runHelpers';

/**
 * Requests that can never succeed are refused before the queue: 422 with the field at fault as the
 * issue's path, and nothing stored (no run, study or cell row) and no job queued. A worker runs only
 * to finish the parent of the re-analyses, and is closed before the refusals are tried.
 */
let ctx: TestContext;
let researcher: SignedUpUser;
let parentRunId: string;
let coordinatesId: string;
let relationsId: string;

const diamond = { kind: 'diamond2d', properTime: 2 } as const;
const cylinder = { kind: 'cylinder2d', properTime: 2, circumference: 2 } as const;
const slab = { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 1 } as const;
const rules = [{ truncation: { rule: 'none' } }];

async function upload(csv: string, fields: Record<string, string>): Promise<string> {
  const req = request(ctx.app).post('/api/causal-sets').set(bearer(researcher.token));
  for (const [k, v] of Object.entries(fields)) req.field(k, v);
  const res = await req.attach('file', Buffer.from(csv), 'set.csv');
  if (res.status !== 201) throw new Error(`upload answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

beforeAll(async () => {
  ctx = await createTestContext();
  researcher = await signUp(ctx.app);
  const points = sprinkle({ region: diamond, process: 'fixed', count: 40, seed: 'refusals', prng: 'arc4' }).points;
  const rows = Array.from({ length: 40 }, (_, i) => `${points[2 * i]},${points[2 * i + 1]}`);
  coordinatesId = await upload(`t,x\n${rows.join('\n')}\n`, { name: 'forty points', kind: 'coordinates', region: JSON.stringify(diamond) });
  relationsId = await upload('i,j\n0,1\n1,2\n2,3\n0,4\n', { name: 'six elements', kind: 'relations', count: '6', dimension: '2' });
  const worker: Worker = await startTestWorker(ctx);
  try {
    parentRunId = await postRun(ctx.app, researcher.token, diamondRun({ title: 'parent' }, { count: 60 }));
    const { run } = await waitForRun(ctx.app, researcher.token, parentRunId);
    if (run.status !== 'done') throw new Error(`the parent run ended ${run.status}: ${run.error}`);
  } finally {
    await worker.close();
  }
}, 60_000);
afterAll(async () => {
  await ctx?.close();
});

/** Rows of the tables a refused request might have touched, and every job in the queue. */
async function stored(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const table of ['runs', 'studies', 'study_cells']) out[table] = Number((await ctx.dataSource.query(`SELECT count(*) AS n FROM ${table}`))[0].n);
  const jobs = await ctx.computeQueue.getJobCounts();
  out.jobs = Object.values(jobs).reduce((a, b) => a + b, 0);
  return out;
}

type Case = [name: string, path: string, body: Record<string, unknown>, field: string, message: RegExp];

async function expectRefused([name, path, body, field, message]: Case): Promise<void> {
  const before = await stored();
  const res = await request(ctx.app).post(path).set(bearer(researcher.token)).send(body);
  expect(res.status, `${name}: ${JSON.stringify(res.body)}`).toBe(422);
  expect(res.body.error.code, name).toBe('invalid_request');
  expect(res.body.error.message, name).toMatch(message);
  expect(res.body.error.issues, name).toEqual([{ path: field, message: expect.any(String) }]);
  expect(res.body.error.issues[0].message, name).toMatch(message);
  expect(await stored(), name).toEqual(before);
}

describe('POST /api/runs refuses what no sprinkling can serve', () => {
  const cases: Case[] = [
    ['element label N of a fixed-N sprinkling', '/api/runs', diamondRun({ subregion: { kind: 'elements', indices: [0, 60] } }, { count: 60 }), 'subregion.indices', /element 60 does not exist.*60 elements/],
    // Poisson of mean 60: mean + 5σ = 98.7, so no draw has an element 99 or beyond
    ['element label past the plausible N of a Poisson sprinkling', '/api/runs', diamondRun({ subregion: { kind: 'elements', indices: [3, 99] } }, { count: 60, process: 'poisson' }), 'subregion.indices', /element 99 cannot exist.*Poisson/],
    ['one element listed twice', '/api/runs', diamondRun({ subregion: { kind: 'elements', indices: [5, 5] } }), 'subregion.indices', /1 distinct element/],
    ['past tip outside the region', '/api/runs', diamondRun({ subregion: { kind: 'diamond', past: { t: -1.5, x: 0 }, future: { t: 0.5, x: 0 } } }), 'subregion.past', /past tip .* outside the diamond2d region/],
    ['future tip outside the region', '/api/runs', diamondRun({ subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 1.5, x: 0 } } }), 'subregion.future', /future tip .* outside the diamond2d region/],
    ['future tip not in the future of the past tip', '/api/runs', diamondRun({ subregion: { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 0.2, x: 0.5 } } }), 'subregion.future', /future light cone of the past tip/],
    // on the cylinder of circumference 2, Δx = 0.9 is also the short way round (1.1 the other), so Δt = 0.2 is too little
    ['cylinder tips spacelike both ways round', '/api/runs', diamondRun({ subregion: { kind: 'diamond', past: { t: -0.1, x: 0 }, future: { t: 0.1, x: 0.9 } } }, { region: cylinder }), 'subregion.future', /circumference 2/],
    ['sub-diamond reaching out of a slab', '/api/runs', diamondRun({ subregion: { kind: 'diamond', past: { t: 0.1, x: 0.1 }, future: { t: 0.9, x: 0.1 } } }, { region: slab }), 'subregion', /outside the slab at its corner/],
    ['more modes than N/2', '/api/runs', diamondRun({ truncation: { rule: 'modes', count: 31 } }, { count: 60 }), 'truncation.count', /at most 30/],
    ['structured engine with truncation none', '/api/runs', diamondRun({ engine: 'structured', truncation: { rule: 'none' } }), 'engine', /truncation "none"/],
    ['structured engine on the cylinder', '/api/runs', diamondRun({ engine: 'structured' }, { region: cylinder }), 'engine', /cylinder/],
  ];
  for (const c of cases) it(c[0], () => expectRefused(c));

  it('accepts what only a draw or the periodic x decides (a contrast: the rules above are not too wide)', async () => {
    const before = await stored();
    // a label below the plausible maximum of a Poisson sprinkling: the worker checks it once N is drawn
    const poisson = await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(diamondRun({ subregion: { kind: 'elements', indices: [3, 98] } }, { count: 60, process: 'poisson' }));
    expect(poisson.status).toBe(202);
    // x = 1.05 on the cylinder of circumference 2 is the event at x = −0.95, inside the wrapped diamond of proper time 4
    const wrapped = diamondRun({ subregion: { kind: 'diamond', past: { t: 0.3, x: 1.05 }, future: { t: 0.5, x: 1.05 } } }, { region: { ...cylinder, properTime: 4 } });
    expect((await request(ctx.app).post('/api/runs').set(bearer(researcher.token)).send(wrapped)).status).toBe(202);
    const after = await stored();
    expect(after.runs - before.runs).toBe(2);
    expect(after.jobs - before.jobs).toBe(2);
  });
});

describe('POST /api/runs on an imported causal set', () => {
  it('refuses labels past its N, tips outside its region and an engine it cannot run on', async () => {
    const cases: Case[] = [
      ['label N of a coordinates set', '/api/runs', { causalSetId: coordinatesId, subregion: { kind: 'elements', indices: [0, 40] } }, 'subregion.indices', /element 40 does not exist.*40 elements/],
      ['tips outside the set region', '/api/runs', { causalSetId: coordinatesId, subregion: { kind: 'diamond', past: { t: -1.2, x: 0 }, future: { t: 0, x: 0 } } }, 'subregion.past', /past tip .* outside the diamond2d region/],
      ['label N of a relation list', '/api/runs', { causalSetId: relationsId, subregion: { kind: 'elements', indices: [0, 6] } }, 'subregion.indices', /element 6 does not exist.*6 elements/],
      ['structured engine on a relation list', '/api/runs', { causalSetId: relationsId, truncation: { rule: 'sqrtN' }, engine: 'structured' }, 'engine', /needs coordinates/],
    ];
    for (const c of cases) await expectRefused(c);
  });
});

describe('POST /api/runs/:id/reanalyse', () => {
  it('refuses on the parent points what can never be computed there', async () => {
    const path = `/api/runs/${parentRunId}/reanalyse`;
    const cases: Case[] = [
      ['label N of the parent points', path, { subregion: { kind: 'elements', indices: [1, 60] } }, 'subregion.indices', /element 60 does not exist.*60 elements/],
      ['future tip outside the parent region', path, { subregion: { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 1.2, x: 0 } } }, 'subregion.future', /future tip .* outside the diamond2d region/],
      ['a sub-diamond holding none of the parent points', path, { subregion: { kind: 'diamond', past: { t: 0, x: 0 }, future: { t: 0.001, x: 0 } } }, 'subregion', /holds 0 of the 60 elements/],
      ['more modes than the parent N allows', path, { truncation: { rule: 'modes', count: 31 } }, 'truncation.count', /at most 30/],
      ['structured engine with the knee', path, { truncation: { rule: 'knee' }, engine: 'structured' }, 'engine', /knee finder/],
    ];
    for (const c of cases) await expectRefused(c);
  });
});

describe('POST /api/studies', () => {
  it('refuses sub-diamonds outside the region, rules the smallest N cannot serve and labels past an imported N', async () => {
    const sprinkled = (extra: Record<string, unknown>) => ({ counts: [40, 80], seeds: ['a'], subregions: { kind: 'concentric', fractions: [0.5] }, rules, ...extra });
    const tips = (past: object, future: object) => ({ kind: 'tips', diamonds: [{ past, future }] });
    const cases: Case[] = [
      ['past tip outside the region', '/api/studies', sprinkled({ subregions: tips({ t: -1.5, x: 0 }, { t: 0.5, x: 0 }) }), 'subregions.diamonds.0.past', /past tip .* outside the diamond2d region/],
      ['sub-diamond reaching out of a slab', '/api/studies', sprinkled({ region: slab, subregions: tips({ t: 0.1, x: 0.1 }, { t: 0.9, x: 0.1 }) }), 'subregions.diamonds.0', /outside the slab at its corner/],
      ['cylinder tips spacelike both ways round', '/api/studies', sprinkled({ region: cylinder, subregions: tips({ t: -0.1, x: 0 }, { t: 0.1, x: 0.9 }) }), 'subregions.diamonds.0.future', /circumference 2/],
      ['more modes than the smallest N has', '/api/studies', sprinkled({ rules: [{ truncation: { rule: 'modes', count: 21 } }] }), 'rules.0.truncation.count', /at most 20/],
      [
        'label past the N of an imported set',
        '/api/studies',
        { source: 'imported', causalSetIds: [coordinatesId], subregions: { kind: 'elements', lists: [{ indices: [0, 1, 40] }] }, rules },
        'subregions.lists.0.indices',
        /element 40 does not exist in "forty points"/,
      ],
      [
        'tips outside the region of an imported set',
        '/api/studies',
        { source: 'imported', causalSetIds: [coordinatesId], subregions: tips({ t: -0.5, x: 0 }, { t: 1.5, x: 0 }), rules },
        'subregions.diamonds.0.future',
        /future tip .* outside the diamond2d region of "forty points"/,
      ],
    ];
    for (const c of cases) await expectRefused(c);
  });
});
