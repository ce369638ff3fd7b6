import type { Worker } from 'bullmq';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fetchWork, RemoteUsageError, submit, type RemoteIo } from '../../server/cli/remote';
import { createTestContext, signUp, startTestWorker, type TestContext } from '../support/app';
import { exportFileName, runExportFormats } from '@shared/exports';

// Issue 17 §5: `tacet submit` / `tacet fetch` talk to a running service with TACET_URL and TACET_TOKEN.
let ctx: TestContext;
let server: Server;
let worker: Worker;
let url: string;
let token: string;
const dir = mkdtempSync(join(tmpdir(), 'tacet-remote-'));

beforeAll(async () => {
  ctx = await createTestContext();
  worker = await startTestWorker(ctx);
  server = await new Promise((ready) => {
    const s = ctx.app.listen(0, '127.0.0.1', () => ready(s));
  });
  url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const user = await signUp(ctx.app, { teamName: 'Remote Group' });
  const created = await request(ctx.app).post('/api/me/tokens').set('Authorization', `Bearer ${user.token}`).send({ name: 'notebook', teamId: user.teamId });
  expect(created.status).toBe(201);
  token = created.body.token;
});
afterAll(async () => {
  await worker?.close();
  server?.closeAllConnections();
  await new Promise((closed) => server?.close(closed));
  await ctx?.close();
});

function io(env: Record<string, string | undefined> = { TACET_URL: url, TACET_TOKEN: token }): RemoteIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { out, err, env, stdout: (t) => out.push(t), stderr: (t) => err.push(t) };
}

const specFile = (name: string, spec: unknown) => {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(spec));
  return path;
};

const runSpec = {
  title: 'from a notebook',
  sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 150, seed: 'remote-1' },
  truncation: { rule: 'sqrtN' },
  doubleTruncation: true,
  subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } },
};

describe('tacet submit and fetch against a running service', () => {
  it('submits a run, waits for it and downloads its detail and every export', async () => {
    const sent = io();
    await submit([specFile('run.json', runSpec)], sent);
    const answer = JSON.parse(sent.out.join(''));
    expect(answer).toMatchObject({ kind: 'run', id: expect.any(String), url: `${url}/runs/${answer.id}` });

    const got = io();
    const out = join(dir, 'run-out');
    await fetchWork([answer.id, '--wait', '--out', out], got);
    const detail = JSON.parse(got.out.join(''));
    expect(detail).toMatchObject({ id: answer.id, status: 'done', title: 'from a notebook' });
    expect(detail.result.entropy.S).toBeGreaterThan(0);
    const files = readdirSync(out).sort();
    // the detail and one file per run export of the formats table, under the table's file names
    expect(files).toEqual([`run-${answer.id}.json`, ...runExportFormats.map((format) => exportFileName('run', answer.id, format))].sort());
    expect(files.find((f) => f.endsWith('-points.csv'))).toBeDefined();
    const points = readFileSync(join(out, files.find((f) => f.endsWith('-points.csv'))!), 'utf8');
    expect(points.trim().split('\n')).toHaveLength(151);
  }, 120_000);

  it('submits a study spec and fetches its detail', async () => {
    const sent = io();
    const spec = {
      title: 'remote study',
      region: { kind: 'diamond2d', properTime: 2 },
      counts: [100],
      seeds: ['a', 'b'],
      subregions: { kind: 'concentric', fractions: [0.5] },
      rules: [{ truncation: { rule: 'none' } }],
    };
    await submit([specFile('study.json', spec)], sent);
    const answer = JSON.parse(sent.out.join(''));
    expect(answer.kind).toBe('study');
    const got = io();
    await fetchWork([answer.id, '--wait'], got);
    expect(JSON.parse(got.out.join(''))).toMatchObject({ id: answer.id, status: 'done', title: 'remote study' });
  }, 120_000);

  it('says clearly what is wrong: the URL, the token, the spec', async () => {
    const file = specFile('run2.json', runSpec);
    const refused = async (env: Record<string, string | undefined>, args = [file]) => {
      try {
        await submit(args, io(env));
      } catch (error) {
        expect(error).toBeInstanceOf(RemoteUsageError);
        return (error as Error).message;
      }
      throw new Error('not refused');
    };
    expect(await refused({ TACET_TOKEN: token })).toContain('set TACET_URL');
    // a port nothing listens on (taken, then freed)
    const probe = await new Promise<Server>((ready) => {
      const s = ctx.app.listen(0, '127.0.0.1', () => ready(s));
    });
    const closedPort = (probe.address() as AddressInfo).port;
    await new Promise((closed) => probe.close(closed));
    expect(await refused({ TACET_URL: `http://127.0.0.1:${closedPort}`, TACET_TOKEN: token })).toContain(`cannot reach Tacet at http://127.0.0.1:${closedPort} (ECONNREFUSED)`);
    expect(await refused({ TACET_URL: url, TACET_TOKEN: 'tct_not-a-real-token' })).toMatch(/refused TACET_TOKEN .*expired or been revoked/);
    expect(await refused({ TACET_URL: url, TACET_TOKEN: 'abc' })).toContain('starting with tct_');
    const bad = specFile('bad.json', { ...runSpec, truncation: { rule: 'lambda' } });
    expect(await refused({ TACET_URL: url, TACET_TOKEN: token }, [bad])).toMatch(/not a valid run spec: truncation\.cut/);
    // refused by the service itself (the engine's checks), with the field
    const outside = specFile('outside.json', { ...runSpec, subregion: { kind: 'diamond', past: { t: -3, x: 0 }, future: { t: 3, x: 0 } } });
    expect(await refused({ TACET_URL: url, TACET_TOKEN: token }, [outside])).toMatch(/the service refused the run: .*subregion/);
    const missing = io();
    await expect(fetchWork(['00000000-0000-4000-8000-000000000000'], missing)).rejects.toThrow(/no run or study/);
  });
});
