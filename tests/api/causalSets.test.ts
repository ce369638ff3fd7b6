import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiErrorSchema } from '@shared/api';
import { CAUSAL_SET_FILE_LIMIT_BYTES, causalSetDetailSchema, causalSetListResponseSchema } from '@shared/causalSets';
import { insertMembership } from '../../server/db/repositories/teams';
import { DENSE_SIZE_LIMIT } from '../../server/engine/index';
import { causalMatrix, linkMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';
import { createTestContext, signUp, type SignedUpUser, type TestContext } from '../support/app';

let ctx: TestContext;
let owner: SignedUpUser;
let researcher: SignedUpUser;
let viewer: SignedUpUser;
let outsider: SignedUpUser;

beforeAll(async () => {
  ctx = await createTestContext();
  owner = await signUp(ctx.app, { teamName: 'Import Group' });
  researcher = await signUp(ctx.app);
  viewer = await signUp(ctx.app);
  for (const [user, role] of [[researcher, 'researcher'], [viewer, 'viewer']] as const) {
    await insertMembership(ctx.dataSource.manager, { userId: user.id, teamId: owner.teamId, role });
  }
  outsider = await signUp(ctx.app);
});
afterAll(async () => {
  await ctx?.close();
});

const asUser = (user: SignedUpUser, teamId = owner.teamId) => ({ Authorization: `Bearer ${user.token}`, 'x-tacet-team': teamId });

interface UploadOptions {
  user?: SignedUpUser;
  fileName?: string;
  fields?: Record<string, string>;
}

function upload(content: string | Buffer | null, options: UploadOptions = {}) {
  const req = request(ctx.app).post('/api/causal-sets').set(asUser(options.user ?? researcher));
  for (const [key, value] of Object.entries(options.fields ?? {})) req.field(key, value);
  if (content !== null) req.attach('file', Buffer.isBuffer(content) ? content : Buffer.from(content), options.fileName ?? 'points.csv');
  return req;
}

const diamondFields = (name = 'diamond') => ({ name, kind: 'coordinates', region: JSON.stringify({ kind: 'diamond2d', properTime: 2 }) });
const relationFields = (count: number, name = 'order') => ({ name, kind: 'relations', count: String(count), dimension: '2' });

async function storedCount(): Promise<number> {
  const rows: { n: string }[] = await ctx.dataSource.query('SELECT count(*) AS n FROM causal_sets');
  return Number(rows[0].n);
}

describe('POST /api/causal-sets and reading back', () => {
  it('stores a coordinates CSV: list, summary with preview, the original bytes and file name, checksum', async () => {
    const csv = '# made elsewhere\nt,x\n0.1,0.2\n-0.5,0.25\n0.5,-0.25\n0,0\n';
    const res = await upload(csv, { fileName: 'my sprinkling.csv', fields: diamondFields('four points') });
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ id: expect.any(String) });
    const id = res.body.id as string;

    const list = await request(ctx.app).get('/api/causal-sets').set(asUser(viewer));
    expect(list.status).toBe(200);
    const parsedList = causalSetListResponseSchema.parse(list.body);
    expect(parsedList.limits).toEqual({ maxElements: DENSE_SIZE_LIMIT.maxN, maxFileBytes: CAUSAL_SET_FILE_LIMIT_BYTES });
    const item = parsedList.items.find((x) => x.id === id)!;
    expect(item).toMatchObject({
      name: 'four points',
      kind: 'coordinates',
      dimension: 2,
      N: 4,
      region: { kind: 'diamond2d', properTime: 2 },
      fileName: 'my sprinkling.csv',
      fileBytes: Buffer.byteLength(csv),
      checksum: createHash('sha256').update(csv).digest('hex'),
      createdBy: { id: researcher.id },
    });
    // server/engine/README.md §2: a 2D diamond of proper time τ has volume τ²/2, so ρ = N/V = 4/2
    expect(item.volume).toBeCloseTo(2, 14);
    expect(item.density).toBeCloseTo(2, 14);
    // (−0.5,0.25) ≺ (0,0) ≺ (0.5,−0.25) and (−0.5,0.25) ≺ (0.1,0.2), (−0.5, 0.25) ≺ (0.5, −0.25): 4 relations
    expect(item.stats).toMatchObject({ relations: 4, links: 3, height: 3, orderingFraction: 4 / 6, minimal: 1, maximal: 2 });

    const detail = await request(ctx.app).get(`/api/causal-sets/${id}`).set(asUser(viewer));
    expect(detail.status).toBe(200);
    const parsed = causalSetDetailSchema.parse(detail.body);
    expect(parsed.preview).toEqual({ kind: 'coordinates', columns: ['t', 'x'], points: [[0.1, 0.2], [-0.5, 0.25], [0.5, -0.25], [0, 0]] });

    const file = await request(ctx.app).get(`/api/causal-sets/${id}/file`).set(asUser(viewer)).buffer(true).parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
    expect(file.status).toBe(200);
    expect((file.body as Buffer).toString('utf8')).toBe(csv);
    expect(file.headers['content-disposition']).toContain('my sprinkling.csv');
    expect(file.headers['content-type']).toMatch(/^text\/csv/);
  });

  it('stores a 4D coordinates file with a density instead of a region', async () => {
    const res = await upload('t,x,y,z\n0,0,0,0\n1,0.1,0.2,0.3\n2,5,0,0\n', { fields: { name: '4D', kind: 'coordinates', density: '12.5' } });
    expect(res.status).toBe(201);
    const detail = await request(ctx.app).get(`/api/causal-sets/${res.body.id}`).set(asUser(owner));
    expect(detail.body).toMatchObject({ dimension: 4, N: 3, density: 12.5, volume: null, region: null, stats: { relations: 1 } });
    expect(detail.body.preview.columns).toEqual(['t', 'x', 'y', 'z']);
  });

  it('stores a relation list closed transitively, with its summary (ordering fraction, height, layers)', async () => {
    const res = await upload('i,j\n0,1\n1,2\n2,3\n0,4\n', { fileName: 'chain.csv', fields: relationFields(6, 'chain') });
    expect(res.status).toBe(201);
    const detail = causalSetDetailSchema.parse((await request(ctx.app).get(`/api/causal-sets/${res.body.id}`).set(asUser(viewer))).body);
    // closure of 0≺1≺2≺3 and 0≺4: 6 + 1 relations among C(6,2) = 15 pairs; element 5 stands alone
    expect(detail).toMatchObject({ kind: 'relations', dimension: 2, N: 6, density: null, region: null });
    expect(detail.stats).toMatchObject({ relations: 7, links: 4, orderingFraction: 7 / 15, height: 4, minimal: 2, maximal: 3 });
    // worked by hand: links 0≺1, 1≺2, 2≺3, 0≺4; one element between in 0≺2 and 1≺3; two in 0≺3
    expect(detail.stats.manifold).toMatchObject({ N: 6, relations: 7, links: 4, longestChain: 4, intervalAbundances: [4, 2, 1, 0, 0, 0, 0, 0, 0, 0, 0] });
    expect(detail.warnings).toEqual([]);
    expect(detail.preview).toEqual({ kind: 'relations', layerSizes: [2, 2, 1, 1] });
  });

  it('warns when a relation list is declared in a dimension its order disagrees with, and not when it agrees', async () => {
    // a 2D sprinkling's links as a relation list: the import closes them again into the 2D order
    const { points } = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 600, seed: 'declared-dimension', prng: 'arc4' });
    const rows: string[] = ['i,j'];
    linkMatrix(causalMatrix(points, 2)).forEach((i, j) => rows.push(`${i},${j}`));
    const file = rows.join('\n');
    const as4d = await upload(file, { fileName: 'links.csv', fields: { name: 'said 4D', kind: 'relations', count: '600', dimension: '4', density: '150' } });
    const as2d = await upload(file, { fileName: 'links.csv', fields: { name: 'said 2D', kind: 'relations', count: '600', dimension: '2' } });
    const read = async (id: string) => causalSetDetailSchema.parse((await request(ctx.app).get(`/api/causal-sets/${id}`).set(asUser(viewer))).body);
    const wrong = await read(as4d.body.id);
    const right = await read(as2d.body.id);
    // Myrheim 1978 / Meyer 1988: a 2D diamond's ordering fraction is ½, dimension 2
    expect(Math.abs(right.stats.manifold!.dimension.myrheimMeyer.estimate! - 2)).toBeLessThan(2 * right.stats.manifold!.dimension.myrheimMeyer.error!);
    expect(right.warnings).toEqual([]);
    expect(wrong.warnings).toHaveLength(1);
    expect(wrong.warnings[0]).toMatch(/^Declared 4D, but the Myrheim–Meyer dimension of its order is 2\.\d+ ± 0\.\d+/);
    const list = causalSetListResponseSchema.parse((await request(ctx.app).get('/api/causal-sets').set(asUser(viewer))).body);
    expect(list.items.find((item) => item.id === as4d.body.id)?.warnings).toEqual(wrong.warnings);
  });

  it('stores a relation list of several megabytes, parsed off the event loop, and keeps its original bytes', async () => {
    // a total order of 1100 elements: every pair i < j, about 3.7 MB, above the 1 MB threshold of the thread
    const lines: string[] = [];
    for (let i = 0; i < 1100; i++) for (let j = i + 1; j < 1100; j++) lines.push(`${i},${j}`);
    const file = Buffer.from(lines.join('\n') + '\n');
    expect(file.byteLength).toBeGreaterThan(1 << 20);
    const res = await upload(file, { fileName: 'chain1100.csv', fields: relationFields(1100, 'long chain') });
    expect(res.status).toBe(201);
    const detail = causalSetDetailSchema.parse((await request(ctx.app).get(`/api/causal-sets/${res.body.id}`).set(asUser(viewer))).body);
    expect(detail.stats).toMatchObject({ relations: (1100 * 1099) / 2, links: 1099, orderingFraction: 1, height: 1100 });
    const original = await request(ctx.app).get(`/api/causal-sets/${res.body.id}/file`).set(asUser(viewer)).buffer(true).parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
    expect(createHash('sha256').update(original.body as Buffer).digest('hex')).toBe(createHash('sha256').update(file).digest('hex'));
    // a bad row deep in a large file is reported with its line, through the thread too
    const bad = Buffer.concat([file, Buffer.from('7,seven\n')]);
    const refused = await upload(bad, { fileName: 'bad.csv', fields: relationFields(1100, 'bad chain') });
    expect(refused.status).toBe(422);
    expect(refused.body.error.message).toMatch(new RegExp(`^row ${lines.length + 1}, column 2`));
  });

  it('lets members of other teams see nothing: 404 for summary, file and delete, and an empty list', async () => {
    const res = await upload('t,x\n0,0\n0.5,0\n', { fields: diamondFields('private') });
    const id = res.body.id as string;
    for (const path of [`/api/causal-sets/${id}`, `/api/causal-sets/${id}/file`]) {
      expect((await request(ctx.app).get(path).set(asUser(outsider, outsider.teamId))).status).toBe(404);
    }
    expect((await request(ctx.app).delete(`/api/causal-sets/${id}`).set(asUser(outsider, outsider.teamId))).status).toBe(404);
    const list = await request(ctx.app).get('/api/causal-sets').set(asUser(outsider, outsider.teamId));
    expect(list.body.items).toEqual([]);
    // asking for the other team by header is refused as well
    expect((await request(ctx.app).get(`/api/causal-sets/${id}`).set(asUser(outsider, owner.teamId))).status).toBe(404);
    expect((await request(ctx.app).get('/api/causal-sets/not-a-uuid').set(asUser(owner))).status).toBe(404);
  });

  it('lets viewers read but not upload or delete; owners and researchers delete', async () => {
    const before = await storedCount();
    const refused = await upload('t,x\n0,0\n0.5,0\n', { user: viewer, fields: diamondFields() });
    expect(refused.status).toBe(403);
    expect(await storedCount()).toBe(before);
    const id = (await upload('t,x\n0,0\n0.5,0\n', { fields: diamondFields('to delete') })).body.id as string;
    expect((await request(ctx.app).delete(`/api/causal-sets/${id}`).set(asUser(viewer))).status).toBe(403);
    expect((await request(ctx.app).delete(`/api/causal-sets/${id}`).set(asUser(owner))).status).toBe(204);
    expect((await request(ctx.app).get(`/api/causal-sets/${id}`).set(asUser(owner))).status).toBe(404);
    expect((await request(ctx.app).delete(`/api/causal-sets/${id}`).set(asUser(owner))).status).toBe(404);
    expect((await request(ctx.app).get('/api/causal-sets')).status).toBe(401);
  });
});

describe('bad uploads: a 4xx that says where and what, and nothing stored', () => {
  const cases: { label: string; content: string | Buffer | null; fields: Record<string, string>; status: number; code: string; message: RegExp }[] = [
    { label: 'missing header', content: '0.1,0.2\n0.3,0.4\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 1: the header is missing/ },
    { label: 'wrong header', content: 't,y\n0.1,0.2\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 1: wrong header "t,y"/ },
    { label: 'a non-number', content: 't,x\n0,0\n0.1,zero\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 3, column 2: \(x\) "zero" is not a number$/ },
    { label: 'NaN', content: 't,x\n0,0\nNaN,0.1\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 3, column 1: \(t\) "NaN" is not a finite number/ },
    { label: 'Inf', content: 't,x\n0,0\n0.1,Infinity\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 3, column 2: \(x\) "Infinity" is not a finite number/ },
    { label: 'wrong number of columns', content: 't,x\n0,0\n0.1,0.2,0.3\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 3: 3 columns, but the header t,x has 2$/ },
    { label: 'duplicate points', content: 't,x\n0,0\n0.1,0.2\n0,0\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 4: duplicate point: \(t = 0, x = 0\) already appears in row 2$/ },
    { label: 'a point outside the region', content: 't,x\n0,0\n0.9,0.2\n', fields: diamondFields(), status: 422, code: 'invalid_file', message: /^row 3: the point \(t = 0.9, x = 0.2\) lies outside the stated region \(diamond2d\)(; every point lies inside 2D causal diamond, T = 2\.3 \(diamond2d, properTime 2\.3\), the smallest centred diamond holding them.*)?$/ },
    { label: 'a cycle in the relations', content: '0,1\n1,2\n2,0\n', fields: relationFields(3), status: 422, code: 'invalid_file', message: /^rows 1, 2 and 3 form a cycle 0 ≺ 1 ≺ 2 ≺ 0/ },
    { label: 'an index out of range', content: '0,1\n1,7\n', fields: relationFields(3), status: 422, code: 'invalid_file', message: /^row 2, column 2: \(j\) index out of range: element 7 does not exist \(labels run from 0 to 2\)$/ },
    { label: 'an empty file', content: Buffer.alloc(0), fields: diamondFields(), status: 422, code: 'empty_file', message: /^the file is empty$/ },
    {
      label: 'more elements than the engine can hold (coordinates)',
      content: `t,x\n${Array.from({ length: DENSE_SIZE_LIMIT.maxN + 1 }, (_, i) => `${(i / (DENSE_SIZE_LIMIT.maxN + 2)).toFixed(6)},0`).join('\n')}\n`,
      fields: { name: 'big', kind: 'coordinates', density: '1' },
      status: 422,
      code: 'too_large',
      message: new RegExp(`^the causal set has ${DENSE_SIZE_LIMIT.maxN + 1} elements, more than the engine can hold \\(${DENSE_SIZE_LIMIT.maxN}\\): the dense pipeline`),
    },
    {
      label: 'more elements than the engine can hold (relations)',
      content: '0,1\n',
      fields: relationFields(DENSE_SIZE_LIMIT.maxN + 1),
      status: 422,
      code: 'too_large',
      message: /more than the engine can hold/,
    },
    { label: 'no file', content: null, fields: diamondFields(), status: 400, code: 'file_missing', message: /multipart field "file"/ },
    { label: 'neither region nor density', content: 't,x\n0,0\n0.1,0\n', fields: { name: 'x', kind: 'coordinates' }, status: 400, code: 'validation_failed', message: /^region: give either the region/ },
    { label: 'a region that is not JSON', content: 't,x\n0,0\n0.1,0\n', fields: { name: 'x', kind: 'coordinates', region: 'diamond' }, status: 400, code: 'validation_failed', message: /^region:/ },
    { label: 'a relation list without count', content: '0,1\n', fields: { name: 'x', kind: 'relations', dimension: '2' }, status: 400, code: 'validation_failed', message: /^count: a relation list needs the element count/ },
  ];

  for (const c of cases) {
    it(`rejects ${c.label}`, async () => {
      const before = await storedCount();
      const res = await upload(c.content, { fields: c.fields });
      expect(res.status).toBe(c.status);
      const { error } = apiErrorSchema.parse(res.body);
      expect(error.code).toBe(c.code);
      expect(error.message).toMatch(c.message);
      if (c.status === 422) expect(error.issues?.[0]).toEqual({ path: 'file', message: expect.stringMatching(c.message) });
      expect(await storedCount()).toBe(before);
    });
  }

  it('rejects a file over the size limit with 413 and the limit in the message', async () => {
    const before = await storedCount();
    const big = Buffer.alloc(CAUSAL_SET_FILE_LIMIT_BYTES + 1, '0');
    const res = await upload(big, { fields: diamondFields() });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('file_too_large');
    expect(res.body.error.message).toBe(`The file is larger than the upload limit of 32 MiB (${CAUSAL_SET_FILE_LIMIT_BYTES} bytes).`);
    expect(await storedCount()).toBe(before);
  });

  it('rejects a second file or another field name for the file', async () => {
    const res = await request(ctx.app)
      .post('/api/causal-sets')
      .set(asUser(researcher))
      .field('name', 'x')
      .field('kind', 'coordinates')
      .field('density', '1')
      .attach('upload', Buffer.from('t,x\n0,0\n0.1,0\n'), 'a.csv');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/multipart field "file"/);
  });

  it('accepts the reference sprinkling (server/engine/README.md §13) in its diamond', async () => {
    // 300 points numpy placed in |t| + |x| ≤ √2, i.e. the 2D diamond of proper time 2√2
    const csv = readFileSync(new URL('../../fixtures/diamond300.csv', import.meta.url));
    const res = await upload(csv, { fileName: 'diamond300.csv', fields: { name: 'diamond300', kind: 'coordinates', region: JSON.stringify({ kind: 'diamond2d', properTime: 2 * Math.SQRT2 }) } });
    expect(res.status).toBe(201);
    const detail = await request(ctx.app).get(`/api/causal-sets/${res.body.id}`).set(asUser(viewer));
    expect(detail.body.N).toBe(300);
    // Myrheim 1978 / Meyer 1988 (recalled from memory): ordering fraction of a 2D diamond → 1/2
    expect(Math.abs(detail.body.stats.orderingFraction - 0.5)).toBeLessThan(0.06);
  });
});
