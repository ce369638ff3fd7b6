import type { Worker } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runExports, runJsonExportSchema, type RunExportFormat } from '@shared/exports';
import { formatEntropy, formatQuantity } from '@shared/precision';
import type { RunDetail } from '@shared/runs';
import { createTestContext, signUp, startTestWorker, type SignedUpUser, type TestContext } from '../support/app';
import { runPython } from '../support/python';
import { bearer, diamondRun, parseCsv, postRun, waitForRun } from '../worker/runHelpers';

/**
 * The whole-run exports of issue 17 §2 (entropy.csv, generalized.csv, run.json, numbers.tex) through
 * the API, the real worker, PostgreSQL and Redis: their content types and file names, the numbers
 * equal to the run's stored ones, and an outside reading of the files by Python's csv and json.
 */
let ctx: TestContext;
let worker: Worker;
let researcher: SignedUpUser;
let run: RunDetail;
let bare: RunDetail;

const centre = { kind: 'diamond', past: { t: -0.4, x: 0 }, future: { t: 0.4, x: 0 } } as const;
const left = { kind: 'diamond', past: { t: -0.3, x: -0.5 }, future: { t: 0.3, x: -0.5 } } as const;
const right = { kind: 'diamond', past: { t: -0.3, x: 0.5 }, future: { t: 0.3, x: 0.5 } } as const;

beforeAll(async () => {
  ctx = await createTestContext();
  researcher = await signUp(ctx.app);
  worker = await startTestWorker(ctx);
  const full = await postRun(
    ctx.app,
    researcher.token,
    diamondRun(
      { title: 'exports, with every entropy', subregion: centre, doubleTruncation: true, renyi: [2, 0.5, 'inf'], mutualInformation: { a: left, b: right }, complement: true },
      { count: 240, seed: 'issue-17-exports' },
    ),
  );
  const plain = await postRun(ctx.app, researcher.token, diamondRun({ title: 'no subregion' }, { count: 80, seed: 'issue-17-plain' }));
  run = (await waitForRun(ctx.app, researcher.token, full)).run;
  bare = (await waitForRun(ctx.app, researcher.token, plain)).run;
  for (const r of [run, bare]) if (r.status !== 'done') throw new Error(`run ${r.id} ended ${r.status}: ${r.error}`);
}, 90_000);
afterAll(async () => {
  await worker?.close();
  await ctx?.close();
});

async function download(id: string, format: RunExportFormat) {
  const res = await request(ctx.app)
    .get(`/api/runs/${id}/${format}`)
    .set(bearer(researcher.token))
    .buffer(true)
    .parse((response, done) => {
      let text = '';
      response.setEncoding('utf8');
      response.on('data', (chunk: string) => (text += chunk));
      response.on('end', () => done(null, text));
    });
  expect(res.status, `${format}: ${res.text}`).toBe(200);
  expect(res.headers['content-type']).toBe(runExports[format].contentType);
  return { text: res.body as string, disposition: res.headers['content-disposition'] as string };
}

describe('whole-run exports', () => {
  it('names each file by the table and sends its content type', async () => {
    const id8 = run.id.slice(0, 8);
    const expected: Partial<Record<RunExportFormat, string>> = {
      'entropy.csv': `tacet-run-${id8}-entropies.csv`,
      'generalized.csv': `tacet-run-${id8}-generalized-eigenvalues.csv`,
      'run.json': `tacet-run-${id8}.json`,
      'numbers.tex': `tacet-run-${id8}-numbers.tex`,
    };
    for (const [format, name] of Object.entries(expected) as [RunExportFormat, string][]) {
      const { disposition } = await download(run.id, format);
      expect(disposition).toMatch(new RegExp(`^attachment; filename="?${name.replace(/\./g, '\\.')}"?$`));
    }
  });

  it('writes every entropy of the run as stored, at full precision', async () => {
    const { header, rows } = parseCsv((await download(run.id, 'entropy.csv')).text);
    expect(header).toEqual(['quantity', 'part', 'alpha', 'n', 'value', 'modes_kept', 'cutoff', 'restricted_cut']);
    const value = (quantity: string, part: string, alpha = '1') => {
      const row = rows.find((r) => r[0] === quantity && r[1] === part && r[2] === alpha);
      if (!row) throw new Error(`no row ${quantity} ${part} ${alpha}`);
      return row;
    };
    const result = run.result!;
    // 17 significant digits read back as the very double stored (IEEE 754 §5.12.2, common practice)
    expect(Number(value('S', 'O')[4])).toBe(result.entropy!.S);
    expect(Number(value('S', 'O')[3])).toBe(result.entropy!.n);
    expect(value('S', 'O')[7]).toBe('√n/(4π)');
    for (const [key, stored] of Object.entries(result.entropy!.renyi!)) expect(Number(value('S_alpha', 'O', key)[4])).toBe(stored);
    expect(Number(value('S', 'A')[4])).toBe(result.mutualInformation!.a.S);
    expect(Number(value('S', 'B')[4])).toBe(result.mutualInformation!.b.S);
    expect(Number(value('S', 'AB')[4])).toBe(result.mutualInformation!.union.S);
    expect(Number(value('I', 'A:B')[4])).toBe(result.mutualInformation!.I);
    expect(Number(value('S', 'Oprime')[4])).toBe(result.complement!.S);
    expect(Number(value('difference', 'Oprime-O')[4])).toBe(result.complement!.difference);
    expect(rows).toHaveLength(1 + 3 + 4 + 2);
  });

  it('writes the generalised eigenvalues the run stored, and header-only files for a run without a subregion', async () => {
    const { header, rows } = parseCsv((await download(run.id, 'generalized.csv')).text);
    expect(header).toEqual(['rank', 'mu']);
    expect(rows.map((r) => Number(r[1]))).toEqual(run.result!.entropy!.generalizedEigenvalues);
    expect(rows.map((r) => Number(r[0]))).toEqual(rows.map((_, k) => k + 1));
    expect(rows.length).toBeGreaterThan(0);
    expect((await download(bare.id, 'generalized.csv')).text).toBe('rank,mu\n');
    expect((await download(bare.id, 'entropy.csv')).text).toBe('quantity,part,alpha,n,value,modes_kept,cutoff,restricted_cut\n');
  });

  it('holds settings, diagnostics, spectrum, μ, entropies and provenance in run.json', async () => {
    const json = runJsonExportSchema.parse(JSON.parse((await download(run.id, 'run.json')).text));
    const result = run.result!;
    expect(json.run).toMatchObject({ id: run.id, title: run.title, createdAt: run.createdAt, finishedAt: run.finishedAt, author: run.author.name });
    expect(json.settings).toMatchObject({ seed: 'issue-17-exports', prng: 'arc4', process: 'fixed', mass: 0, truncation: 'sqrtN', restrictedCut: '√n/(4π)', regionKind: 'diamond2d' });
    expect(json.provenance).toMatchObject({ engineVersion: result.engineVersion, backend: result.backend, engine: result.engine ?? 'dense' });
    expect(json.provenance.tacetVersion).toMatch(/^\d+\.\d+\.\d+/);
    expect(json.diagnostics).toEqual(result.diagnostics);
    expect(json.spectrum.eigenvalues).toEqual(result.eigenvalues);
    expect(json.spectrum).toMatchObject({ cutoff: result.cutoff, modesKept: result.modesKept, N: result.N });
    expect(json.subregion!.generalizedEigenvalues).toEqual(result.entropy!.generalizedEigenvalues);
    expect(json.subregion).toMatchObject({ S: result.entropy!.S, n: result.entropy!.n, renyi: result.entropy!.renyi });
    expect(json.entropies!.mutualInformation!.I).toBe(result.mutualInformation!.I);
    expect(json.entropies!.complement!.SOprime).toBe(result.complement!.S);
    // team-neutral: the team's id appears nowhere in the file
    expect(JSON.stringify(json)).not.toContain(researcher.teamId);
  });

  it('reads back in Python: the CSV columns parse, and S from run.json μ matches the stored S (numpy)', async () => {
    const entropy = (await download(run.id, 'entropy.csv')).text;
    const runJson = (await download(run.id, 'run.json')).text;
    // Python's csv and json modules as the outside reader; S = Σ_{μ>1} [μ ln μ − (μ−1) ln(μ−1)] is the
    // bosonic Gaussian-state entropy of the generalised eigenvalues (server/engine/README.md §9, §15),
    // evaluated here in numpy, with μ a rounding below 1 held at 1 as the engine does
    const outside = runPython<{ columns: string[]; S: number; fromMu: number; I: number; renyi2: number }>(
      `
import csv, io, json, sys
import numpy as np
data = json.load(sys.stdin)
rows = list(csv.DictReader(io.StringIO(data["csv"])))
run = json.loads(data["json"])
mu = np.array(run["subregion"]["generalizedEigenvalues"], dtype=float)
upper = np.maximum(mu[: len(mu) // 2], 1.0)
terms = [m * np.log(m) - ((m - 1) * np.log(m - 1) if m > 1 else 0.0) for m in upper]
s_row = [r for r in rows if r["quantity"] == "S" and r["part"] == "O"][0]
i_row = [r for r in rows if r["quantity"] == "I"][0]
r2 = [r for r in rows if r["quantity"] == "S_alpha" and r["alpha"] == "2"][0]
print(json.dumps({"columns": list(rows[0].keys()), "S": float(s_row["value"]), "fromMu": float(np.sum(terms)), "I": float(i_row["value"]), "renyi2": float(r2["value"])}))
`,
      { csv: entropy, json: runJson },
    );
    expect(outside.columns).toEqual(['quantity', 'part', 'alpha', 'n', 'value', 'modes_kept', 'cutoff', 'restricted_cut']);
    expect(outside.S).toBe(run.result!.entropy!.S);
    expect(outside.I).toBe(run.result!.mutualInformation!.I);
    expect(outside.renyi2).toBe(run.result!.entropy!.renyi!['2']);
    expect(outside.S).toBeGreaterThan(1e-3);
    expect(Math.abs(outside.fromMu - outside.S)).toBeLessThan(1e-9 * Math.max(1, outside.S));
  });

  it('writes the numbers as LaTeX by the precision rule', async () => {
    const { text } = await download(run.id, 'numbers.tex');
    const result = run.result!;
    expect(text).toContain('\\begin{tabular}{ll}');
    expect(text).toContain(`$N$ & $${result.N}$ \\\\`);
    expect(text).toContain(`$S$ & $${formatEntropy(result.entropy!.S, 'latex')}$ \\\\`);
    expect(text).toContain(`$\\lambda_c$ & $${formatQuantity(result.cutoff, 'cut', 'latex')}$ \\\\`);
    expect(text).toContain(`$I(A{:}B)$ & $${formatEntropy(result.mutualInformation!.I, 'latex')}$ \\\\`);
    expect(text).toContain('restricted cut & $\\sqrt{n}/(4\\pi)$');
  });
});
