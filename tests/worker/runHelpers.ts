import type { Express } from 'express';
import request from 'supertest';
import type { RunDetail } from '@shared/runs';

export const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

/** A small 2D diamond run body; `count` stays ≤ 300 so a run takes well under a second of numerics. */
export function diamondRun(overrides: Record<string, unknown> = {}, sprinkling: Record<string, unknown> = {}) {
  return {
    title: 'small diamond',
    sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 120, seed: 'tacet-test', ...sprinkling },
    truncation: { rule: 'sqrtN' },
    ...overrides,
  };
}

export async function postRun(app: Express, token: string, body: object): Promise<string> {
  const res = await request(app).post('/api/runs').set(bearer(token)).send(body);
  if (res.status !== 202) throw new Error(`POST /api/runs answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

export async function getRun(app: Express, token: string, id: string): Promise<RunDetail> {
  const res = await request(app).get(`/api/runs/${id}`).set(bearer(token));
  if (res.status !== 200) throw new Error(`GET /api/runs/${id} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body as RunDetail;
}

/** Polls GET /api/runs/:id until `accept` holds; returns every status seen, in order, and the last detail. */
export async function waitForRun(
  app: Express,
  token: string,
  id: string,
  accept: (run: RunDetail) => boolean = (run) => ['done', 'failed', 'cancelled'].includes(run.status),
  timeoutMs = 45_000,
): Promise<{ run: RunDetail; seen: string[] }> {
  const deadline = Date.now() + timeoutMs;
  const seen: string[] = [];
  for (;;) {
    const run = await getRun(app, token, id);
    if (seen[seen.length - 1] !== run.status) seen.push(run.status);
    if (accept(run)) return { run, seen };
    if (Date.now() > deadline) throw new Error(`run ${id} still ${run.status} (${run.stage}) after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 40));
  }
}

export async function waitUntil<T>(probe: () => Promise<T>, accept: (value: T) => boolean, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (accept(value)) return value;
    if (Date.now() > deadline) throw new Error(`condition not met within ${timeoutMs} ms (last value ${JSON.stringify(value)})`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Parses a CSV body into its header and rows of cells. */
export function parseCsv(text: string): { header: string[]; rows: string[][] } {
  const lines = text.trimEnd().split('\n');
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((l) => l.split(',')) };
}
