import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CAUSAL_SET_FILE_LIMIT_BYTES } from '@shared/causalSets';
import { insertMembership } from '../../server/db/repositories/teams';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';
import { diamondRun } from '../worker/runHelpers';

/**
 * A corpus of malformed requests and files. Each must be answered 4xx with an error message (never
 * a 500, never a hang) and leave every table as it was: nothing is half-stored. No worker runs here.
 */
let ctx: TestContext;
let owner: SignedUpUser;
let queuedStudyId: string;

const tables = ['users', 'teams', 'memberships', 'invitations', 'runs', 'studies', 'study_cells', 'causal_sets', 'cut_rules', 'api_tokens', 'password_resets'];

async function rowCounts(): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const table of tables) counts[table] = Number((await ctx.dataSource.query(`SELECT count(*) AS n FROM ${table}`))[0].n);
  return counts;
}

beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { teamName: 'Corpus Team' });
  const study = await request(ctx.app)
    .post('/api/studies')
    .set(auth())
    .send({ counts: [40], seeds: ['a'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'none' } }] });
  queuedStudyId = study.body.id;
  const viewer = await signUp(ctx.app);
  await insertMembership(ctx.dataSource.manager, { userId: viewer.id, teamId: owner.teamId, role: 'viewer' });
  memberId = viewer.id;
});
afterAll(async () => {
  await ctx?.close();
});

let memberId: string;
const auth = () => ({ Authorization: `Bearer ${owner.token}`, 'x-tacet-team': owner.teamId });
const run = (sprinkling: Record<string, unknown> = {}, extra: Record<string, unknown> = {}) => diamondRun(extra, sprinkling);

type Send = () => request.Test;
const post = (path: string, body: unknown) => () => request(ctx.app).post(path).set(auth()).send(body as object);
const postRaw = (path: string, raw: string | Buffer, type = 'application/json') => () =>
  request(ctx.app).post(path).set(auth()).set('Content-Type', type).send(raw);
const get = (path: string) => () => request(ctx.app).get(path).set(auth());

function multipart(fields: Record<string, string>, file?: { name: string; content: string | Buffer }): Send {
  return () => {
    const req = request(ctx.app).post('/api/causal-sets').set(auth());
    for (const [k, v] of Object.entries(fields)) req.field(k, v);
    return file ? req.attach('file', Buffer.isBuffer(file.content) ? file.content : Buffer.from(file.content), file.name) : req;
  };
}
const diamondFields = { name: 'bad file', kind: 'coordinates', region: JSON.stringify({ kind: 'diamond2d', properTime: 2 }) };

const deep = (levels: number) => '{"a":'.repeat(levels) + '1' + '}'.repeat(levels);

/** [name, request, expected status or list of acceptable 4xx statuses] */
const corpus: [string, Send, number | number[]][] = [
  // --- vacuum runs: types, numbers, sizes, fields
  ['run: sprinkling of the wrong type', post('/api/runs', { sprinkling: 'big', truncation: { rule: 'none' } }), 400],
  ['run: count as a string', post('/api/runs', run({ count: '120' })), 400],
  ['run: count NaN (not JSON)', postRaw('/api/runs', '{"sprinkling":{"region":{"kind":"diamond2d","properTime":2},"count":NaN,"seed":"s"}}'), 400],
  ['run: count 1e400 (Infinity)', postRaw('/api/runs', '{"sprinkling":{"region":{"kind":"diamond2d","properTime":2},"count":1e400,"seed":"s"}}'), 400],
  ['run: negative count', post('/api/runs', run({ count: -5 })), 400],
  ['run: fractional count', post('/api/runs', run({ count: 12.5 })), 400],
  ['run: enormous count', post('/api/runs', run({ count: 1_000_000_000 })), 422],
  ['run: zero proper time', post('/api/runs', run({ region: { kind: 'diamond2d', properTime: 0 } })), 400],
  ['run: unknown region kind', post('/api/runs', run({ region: { kind: 'sphere', radius: 1 } })), 400],
  ['run: unknown top-level field', post('/api/runs', run({}, { priority: 'high' })), 400],
  ['run: negative mass', post('/api/runs', run({}, { mass: -1 })), 400],
  ['run: unknown truncation rule', post('/api/runs', run({}, { truncation: { rule: 'magic' } })), 400],
  ['run: title of 100 000 characters', post('/api/runs', run({}, { title: 'x'.repeat(100_000) })), 400],
  ['run: causalSetId not a uuid', post('/api/runs', { causalSetId: 'abc', truncation: { rule: 'none' } }), 400],
  ['run: causalSetId of nothing', post('/api/runs', { causalSetId: randomUUID(), truncation: { rule: 'none' } }), 422],
  ['run: subregion outside the region', post('/api/runs', run({}, { subregion: { kind: 'tips', past: [-5, 0], future: [5, 0] } })), [400, 422]],
  ['run: both sprinkling and causalSetId', post('/api/runs', { ...run(), causalSetId: randomUUID() }), 400],
  // --- well-formed runs and studies that can never be computed (tests/api/refusals.test.ts checks the field named)
  ['run: sub-diamond tip outside the region', post('/api/runs', run({}, { subregion: { kind: 'diamond', past: { t: -1.5, x: 0 }, future: { t: 0.5, x: 0 } } })), 422],
  ['run: element label at the fixed N', post('/api/runs', run({}, { subregion: { kind: 'elements', indices: [0, 120] } })), 422],
  ['run: structured engine without a cut', post('/api/runs', run({}, { engine: 'structured', truncation: { rule: 'none' } })), 422],
  ['study: sub-diamond outside the region', post('/api/studies', { counts: [40], seeds: ['a'], subregions: { kind: 'tips', diamonds: [{ past: { t: -1.5, x: 0 }, future: { t: 0.5, x: 0 } }] }, rules: [{ truncation: { rule: 'none' } }] }), 422],
  // --- bodies that are not what they claim
  ['body: broken JSON', postRaw('/api/runs', '{"sprinkling": {'), 400],
  ['body: JSON null', postRaw('/api/runs', 'null'), 400],
  ['body: JSON array', postRaw('/api/runs', '[1,2,3]'), 400],
  ['body: nested 2000 levels deep', postRaw('/api/runs', deep(2000)), 400],
  ['body: nested 150 000 levels deep', postRaw('/api/runs', '['.repeat(150_000) + ']'.repeat(150_000)), [400, 413]],
  ['body: over the 1 MB limit', postRaw('/api/runs', JSON.stringify({ title: 'x'.repeat(1_100_000) })), 413],
  ['body: JSON sent as text/plain', postRaw('/api/runs', JSON.stringify(run()), 'text/plain'), 400],
  ['body: JSON sent as form-urlencoded', postRaw('/api/cut-rules', 'name=x&rule=none', 'application/x-www-form-urlencoded'), 400],
  ['body: invalid UTF-8 declared as JSON', postRaw('/api/runs', Buffer.from([0x7b, 0x22, 0xff, 0xfe, 0x22, 0x3a, 0x31, 0x7d])), 400],
  ['body: unsupported charset', postRaw('/api/runs', '{}', 'application/json; charset=klingon'), 415],
  // --- ids in paths, query parameters, headers
  ['path: run id not a uuid', get('/api/runs/not-a-uuid'), 404],
  ['path: run id with SQL', get(`/api/runs/${encodeURIComponent("1' OR '1'='1")}`), 404],
  ['path: run id with a NUL byte', get('/api/runs/%00'), [400, 404]],
  ['path: bad percent-encoding', get('/api/runs/%E0%A4%A'), [400, 404]],
  ['path: study id of 5000 characters', get(`/api/studies/${'a'.repeat(5000)}`), 404],
  ['path: causal set id not a uuid', get('/api/causal-sets/12345/file'), 404],
  ['path: member id not a uuid', () => request(ctx.app).patch('/api/team/members/nope').set(auth()).send({ role: 'viewer' }), 404],
  ['query: page −1', get('/api/runs?page=-1'), 400],
  ['query: page NaN', get('/api/runs?page=NaN'), 400],
  ['query: page size 100 000', get('/api/runs?pageSize=100000'), 400],
  ['query: unknown sort field', get('/api/runs?sort=password_hash'), 400],
  ['query: unknown parameter', get('/api/runs?admin=1'), 400],
  ['query: parameter given twice', get('/api/runs?status=done&status=failed'), 400],
  ['query: search of 10 000 characters', get(`/api/runs?search=${'s'.repeat(10_000)}`), 400],
  ['query: export format unknown', () => get(`/api/studies/${queuedStudyId}/export?format=exe`)(), 400],
  ['header: team id not a uuid', () => request(ctx.app).get('/api/runs').set({ Authorization: `Bearer ${owner.token}`, 'x-tacet-team': 'not-a-team' }), 404],
  ['header: bearer token of 10 000 characters', () => request(ctx.app).get('/api/runs').set('Authorization', `Bearer ${'t'.repeat(10_000)}`), 401],
  // --- studies, cut rules, team, account
  ['study: negative N', post('/api/studies', { counts: [-5], seeds: ['a'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'none' } }] }), 400],
  ['study: enormous N', post('/api/studies', { counts: [10_000_000], seeds: ['a'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'none' } }] }), 422],
  ['study: 5000 seeds', post('/api/studies', { counts: [40], seeds: Array.from({ length: 5000 }, (_, i) => `s${i}`), subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'none' } }] }), 400],
  ['study: fraction above 1', post('/api/studies', { counts: [40], seeds: ['a'], subregions: { kind: 'concentric', fractions: [1.5] }, rules: [{ truncation: { rule: 'none' } }] }), 400],
  ['cut rule: name of 10 000 characters', post('/api/cut-rules', { name: 'n'.repeat(10_000), rule: { rule: 'none' } }), 400],
  ['cut rule: rule as a number', post('/api/cut-rules', { name: 'x', rule: 7 }), 400],
  ['team: unknown role', () => request(ctx.app).patch(`/api/team/members/${memberId}`).set(auth()).send({ role: 'admin' }), 400],
  ['invitation: not an e-mail', post('/api/team/invitations', { email: 'not-mail', role: 'viewer' }), 400],
  ['sign-up: e-mail of 300 characters', post('/api/auth/signup', { email: `${'e'.repeat(290)}@tacet.test`, name: 'E', password: 'long-enough-1' }), 400],
  ['sign-in: password as a number', post('/api/auth/login', { email: 'a@tacet.test', password: 12345678901 }), 400],
  ['account: switch as a string', () => request(ctx.app).patch('/api/me').set(auth()).send({ notifyOnRunDone: 'yes' }), 400],
  ['API token: negative lifetime', post('/api/me/tokens', { name: 't', teamId: randomUUID(), expiresInDays: -1 }), 400],
  ['API token: team id not a uuid', post('/api/me/tokens', { name: 't', teamId: 'mine' }), 400],
  // --- uploads
  ['upload: broken multipart body', () => request(ctx.app).post('/api/causal-sets').set(auth()).set('Content-Type', 'multipart/form-data; boundary=XYZ').send('--XYZ\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\n\r\nt,x\n0,0'), 400],
  ['upload: multipart without a boundary', () => request(ctx.app).post('/api/causal-sets').set(auth()).set('Content-Type', 'multipart/form-data').send('garbage'), 400],
  ['upload: no file', multipart(diamondFields), [400, 422]],
  ['upload: JSON instead of multipart', post('/api/causal-sets', { ...diamondFields, file: 't,x\n0,0\n' }), [400, 415, 422]],
  ['upload: region not JSON', multipart({ ...diamondFields, region: '{bad json' }, { name: 'a.csv', content: 't,x\n0,0\n0.1,0\n' }), 400],
  ['upload: unknown metadata field', multipart({ ...diamondFields, owner: 'me' }, { name: 'a.csv', content: 't,x\n0,0\n0.1,0\n' }), 400],
  ['upload: NaN coordinates', multipart(diamondFields, { name: 'a.csv', content: 't,x\nNaN,0\n0.1,0\n' }), 422],
  ['upload: binary garbage', multipart(diamondFields, { name: 'a.csv', content: Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 37) % 256)) }), 422],
  ['upload: two files', () => multipart(diamondFields, { name: 'a.csv', content: 't,x\n0,0\n' })().attach('file', Buffer.from('t,x\n0,0\n'), 'b.csv'), 400],
  ['upload: over the file limit', multipart(diamondFields, { name: 'big.csv', content: Buffer.alloc(CAUSAL_SET_FILE_LIMIT_BYTES + 1024, 0x31) }), 413],
  ['upload: relation count enormous', multipart({ name: 'r', kind: 'relations', count: '1000000000', dimension: '2' }, { name: 'r.csv', content: '0,1\n' }), [400, 422]],
];

describe('malformed requests and files', () => {
  it('has a corpus of at least 30 cases', () => {
    expect(corpus.length).toBeGreaterThanOrEqual(30);
  });

  it.each(corpus)('%s → 4xx with a message, nothing stored', async (_name, send, expected) => {
    const before = await rowCounts();
    const res = await send();
    const allowed = Array.isArray(expected) ? expected : [expected];
    expect(allowed, `status ${res.status}: ${res.text.slice(0, 300)}`).toContain(res.status);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(res.body.error.code).toEqual(expect.any(String));
    expect(res.body.error.message.length).toBeGreaterThan(5);
    expect(await rowCounts()).toEqual(before);
    // nothing waits on the queue for a request that was refused
    expect(await ctx.computeQueue.getJobCountByTypes('waiting', 'active', 'delayed', 'prioritized')).toBe(1);
  });
});
