import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import {
  exportFileName,
  exportTables,
  exportUrl,
  runExportFormats,
  runExports,
  studyExportFormats,
  studyExports,
  type ExportKind,
} from '@shared/exports';
import { createStudyRequestSchema, type SprinkledStudyRequest, type StudyEntropy } from '@shared/studies';
import { apiRoutes } from '../../server/api/openapi';
import { entropyCsv, generalizedEigenvaluesCsv, pointsCsv, runRenderers, spectrumCsv, spectrumJson, type RunExportSource } from '../../server/exports/runs';
import { runNumbersLatex } from '@shared/runNumbers';
import type { RunDetail } from '@shared/runs';
import { studyRenderers, type StudyExportInput } from '../../server/exports/studies';
import { aggregateEntropies, fitAggregates } from '../../server/studies/aggregate';
import { resolveSubregions } from '../../server/studies/plan';
import { ExportDownloads } from '../../src/ui/ExportDownloads';

/** The labels of the download buttons the client draws for a run or a study. */
function buttonLabels(kind: ExportKind): string[] {
  const html = renderToStaticMarkup(createElement(ExportDownloads, { kind, id: '0123abcd-0000-4000-8000-000000000000' }));
  return [...html.matchAll(/<button[^>]*>([^<]*)<\/button>/g)].map((m) => m[1]!);
}

describe('one export table for the API and the client', () => {
  it('lists the same run formats in the table, the renderers, the routes and the buttons', () => {
    expect(Object.keys(runExports)).toEqual([...runExportFormats]);
    expect(Object.keys(runRenderers)).toEqual([...runExportFormats]);
    const routes = apiRoutes.filter((r) => r.method === 'get' && /^\/api\/runs\/:id\/[^/]+\.[a-z]+$/.test(r.path)).map((r) => r.path);
    expect(routes).toEqual(runExportFormats.map((f) => `/api/runs/:id/${f}`));
    expect(buttonLabels('run')).toEqual(runExportFormats.map((f) => runExports[f].label));
  });

  it('lists the same study formats in the table, the renderers, the query schema and the buttons', () => {
    expect(Object.keys(studyExports)).toEqual([...studyExportFormats]);
    expect(Object.keys(studyRenderers)).toEqual([...studyExportFormats]);
    const route = apiRoutes.find((r) => r.path === '/api/studies/:id/export')!;
    for (const format of studyExportFormats) expect(route.query!.safeParse({ format }).success).toBe(true);
    expect(route.query!.safeParse({ format: 'exe' }).success).toBe(false);
    expect(buttonLabels('study')).toEqual(studyExportFormats.map((f) => studyExports[f].label));
  });

  it('keeps the URLs, file names and content types the API has always answered with', () => {
    const id = '2a2f7d25-1111-4000-8000-000000000000';
    expect(runExportFormats.map((f) => exportUrl('run', id, f))).toEqual([
      `/api/runs/${id}/points.csv`,
      `/api/runs/${id}/spectrum.csv`,
      `/api/runs/${id}/spectrum.json`,
      `/api/runs/${id}/entropy.csv`,
      `/api/runs/${id}/generalized.csv`,
      `/api/runs/${id}/run.json`,
      `/api/runs/${id}/numbers.tex`,
    ]);
    expect(runExportFormats.map((f) => exportFileName('run', id, f))).toEqual([
      'tacet-run-2a2f7d25-points.csv',
      'tacet-run-2a2f7d25-spectrum.csv',
      'tacet-run-2a2f7d25-spectrum.json',
      'tacet-run-2a2f7d25-entropies.csv',
      'tacet-run-2a2f7d25-generalized-eigenvalues.csv',
      'tacet-run-2a2f7d25.json',
      'tacet-run-2a2f7d25-numbers.tex',
    ]);
    expect(exportUrl('study', id, 'aggregates-csv')).toBe(`/api/studies/${id}/export?format=aggregates-csv`);
    const names = Object.fromEntries(studyExportFormats.map((f) => [f, [exportFileName('study', id, f), studyExports[f].contentType]]));
    expect(names).toEqual({
      csv: ['tacet-study-2a2f7d25-entropies.csv', 'text/csv; charset=utf-8'],
      'aggregates-csv': ['tacet-study-2a2f7d25-aggregates.csv', 'text/csv; charset=utf-8'],
      latex: ['tacet-study-2a2f7d25-table.tex', 'text/x-tex; charset=utf-8'],
      json: ['tacet-study-2a2f7d25.json', 'application/json; charset=utf-8'],
      methods: ['tacet-study-2a2f7d25-methods.txt', 'text/plain; charset=utf-8'],
      bibtex: ['tacet-study-2a2f7d25-references.bib', 'text/x-bibtex; charset=utf-8'],
    });
    // every file name ends in its row's extension, which is also what a run's URL ends in
    for (const kind of ['run', 'study'] as const) {
      const { formats, rows } = exportTables[kind] as { formats: readonly string[]; rows: Record<string, { extension: string }> };
      for (const f of formats) expect(exportFileName(kind, id, f as never).endsWith(`.${rows[f]!.extension}`)).toBe(true);
    }
    for (const f of runExportFormats) expect(f.endsWith(`.${runExports[f].extension}`)).toBe(true);
  });
});

describe('run renderers', () => {
  // Digits of the doubles nearest 0.1, 1/3, 2.1, 1.4 and 0.6 to 17 significant digits (IEEE 754
  // binary64, common practice; the same strings as Python's '%.17g').
  const points = { columns: ['t', 'x'], points: [[0.1, -0.25], [1 / 3, 0]] };
  const spectrum = { eigenvalues: [2, 1.5, 0.5], continuum: [2.1, 1.4, 0.6], cutoff: 1, modesKept: 2, N: 3 };
  // the fields of a run's detail the whole-run exports read
  const doneRun = {
    id: '2a2f7d25-1111-4000-8000-000000000000', title: null, status: 'done', stage: null, percent: 100, author: { id: 'u', name: 'Ada' },
    createdAt: '2026-01-01T00:00:00.000Z', startedAt: null, finishedAt: null, dimension: 2, regionKind: 'diamond2d', N: 3, truncation: 'none',
    restrictedCut: null, S: 0.25, parentRunId: null, request: { mass: 0, truncation: { rule: 'none' } }, error: null, cancelRequested: false,
    result: {
      N: 3, density: 3, volume: 1, relations: 2, links: 2, eigenvalues: spectrum.eigenvalues, continuum: null, cutoff: 0, modesKept: 3, knee: null,
      diagnostics: { hermiticity: 0, minEigenvalueW: 0, commutatorResidual: 0, positiveNegativeOverlap: 0, trace: 1.5 },
      entropy: { S: 0.25, n: 2, modesKept: 2, generalizedEigenvalues: [1.2, -0.2], renyi: null },
      backend: 'ml-matrix', engineVersion: 'tacet-engine 0.1.0', timings: {},
    },
  } as RunDetail;

  it('writes the points with 17 significant digits, one element a row', () => {
    expect(pointsCsv(points)).toBe('t,x\n0.10000000000000001,-0.25000000000000000\n0.33333333333333331,0.0000000000000000\n');
  });

  it('writes the spectrum with rank, continuum and the kept flag, and leaves the continuum empty without one', () => {
    expect(spectrumCsv(spectrum)).toBe(
      'rank,eigenvalue,continuum,kept\n1,2.0000000000000000,2.1000000000000001,1\n2,1.5000000000000000,1.3999999999999999,1\n3,0.50000000000000000,0.59999999999999998,0\n',
    );
    expect(spectrumCsv({ ...spectrum, continuum: null, modesKept: 0 }).split('\n')[1]).toBe('1,2.0000000000000000,,0');
  });

  it('writes the spectrum JSON compact, in the order the API always answered', () => {
    expect(spectrumJson(spectrum)).toBe('{"eigenvalues":[2,1.5,0.5],"continuum":[2.1,1.4,0.6],"cutoff":1,"modesKept":2,"N":3}');
  });

  it('renders every format from its source, loading only what it needs', async () => {
    for (const format of runExportFormats) {
      const loaded: string[] = [];
      const source: RunExportSource = {
        points: async () => (loaded.push('points'), points),
        spectrum: async () => (loaded.push('spectrum'), spectrum),
        run: async () => (loaded.push('run'), doneRun),
      };
      const body = await runRenderers[format](source);
      const expected = {
        'points.csv': () => pointsCsv(points),
        'spectrum.csv': () => spectrumCsv(spectrum),
        'spectrum.json': () => spectrumJson(spectrum),
        'entropy.csv': () => entropyCsv(doneRun.result!),
        'generalized.csv': () => generalizedEigenvaluesCsv(doneRun.result!),
        'run.json': () => null,
        'numbers.tex': () => runNumbersLatex(doneRun),
      }[format]();
      if (expected === null) expect((JSON.parse(body) as { run: { id: string } }).run.id, format).toBe(doneRun.id);
      else expect(body, format).toBe(expected);
      const needs = { 'points.csv': ['points'], 'spectrum.csv': ['spectrum'], 'spectrum.json': ['spectrum'], 'run.json': ['run', 'spectrum'] } as Record<string, string[]>;
      expect(loaded.sort(), format).toEqual(needs[format] ?? ['run']);
    }
  });
});

describe('study renderers', () => {
  const request = createStudyRequestSchema.parse({
    counts: [200],
    seeds: ['a', 'b'],
    subregions: { kind: 'concentric', fractions: [0.5] },
    rules: [{ truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
  }) as SprinkledStudyRequest;
  const entropies: StudyEntropy[] = request.seeds.map((seed, k) => ({
    cellId: `cell-${seed}`, N: 200, elements: 200, seed, subregion: 'l/L=0.5', fraction: 0.5, rule: 'sqrtN+double', n: 50 + k,
    S: 0.6 + 0.01 * k, modesKept: 10, cutoff: 0.1, stateModesKept: 20, stateCutoff: 0.2,
  }));
  const aggregates = aggregateEntropies(entropies);
  const input: StudyExportInput = {
    id: '0123abcd-0000-4000-8000-000000000000', title: 'Small', status: 'done', author: 'Tomas Okafor',
    createdAt: '2026-01-01T00:00:00.000Z', finishedAt: '2026-01-01T00:01:00.000Z', request, causalSets: [],
    subregions: resolveSubregions(request), entropies, aggregates, fits: fitAggregates(aggregates),
    cells: request.seeds.map((seed) => ({
      id: `cell-${seed}`, N: 200, seed, status: 'done', elements: 200, backend: 'native', engineVersion: 'tacet-engine 0.1.0',
      startedAt: null, finishedAt: null, timings: null, states: [], error: null,
    })),
  };

  it('renders every format of a small study', () => {
    const bodies = Object.fromEntries(studyExportFormats.map((f) => [f, studyRenderers[f](input)]));
    // tidy: a header and one row per entropy; aggregates: a header and one row per (N, subregion, rule)
    expect(bodies.csv!.trimEnd().split('\n').length).toBe(1 + entropies.length);
    expect(bodies.csv!.startsWith('cell,N,elements,seed,subregion,')).toBe(true);
    expect(bodies['aggregates-csv']!.trimEnd().split('\n')).toHaveLength(2);
    expect(bodies['aggregates-csv']!.split('\n')[1]!.startsWith('200,l/L=0.5,0.5,sqrtN+double,')).toBe(true);
    expect(bodies.latex).toContain('\\begin{tabular}');
    expect(bodies.latex).toContain('\\label{tab:tacet-study-0123abcd}');
    const json = JSON.parse(bodies.json!) as { format: string; study: { id: string }; entropies: unknown[] };
    expect([json.format, json.study.id, json.entropies.length]).toEqual(['tacet-study/1', input.id, 2]);
    expect(bodies.json!.endsWith('}\n')).toBe(true);
    expect(bodies.methods).toContain(`study ${input.id}`);
    // double truncation rests on Sorkin and Yazdi 2018, so its entry is among the references
    expect(bodies.bibtex).toContain('@article{sorkin2018,');
  });
});
