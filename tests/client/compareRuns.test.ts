import { describe, expect, it } from 'vitest';
import type { RunDetail, RunResult } from '@shared/runs';
import {
  compareCsv,
  compareJson,
  compareSearch,
  compareSelection,
  differingSettings,
  distinctLabels,
  entropyCompareTraces,
  entropyRows,
  renyiKeysOf,
  settingRows,
} from '../../src/features/runs/lib/compareRuns';
import { runPython } from '../support/python';

/** A done run on a 2D diamond, with the parts of its detail the compare page reads. */
function doneRun(id: string, options: { seed?: string; mass?: number; N?: number; S?: number; renyi?: Record<string, number> | null; title?: string | null; engine?: 'dense' | 'structured'; restricted?: boolean; pairI?: number } = {}): RunDetail {
  const N = options.N ?? 200;
  const result: RunResult = {
    N, density: N / 2, volume: 2, relations: 10, links: 5, eigenvalues: [3, 2, 1], continuum: null, cutoff: 1.125, modesKept: 2, knee: null,
    diagnostics: { hermiticity: 0, minEigenvalueW: 0, commutatorResidual: 0, positiveNegativeOverlap: 0, trace: 1 },
    entropy: options.S === undefined ? null : { S: options.S, n: 40, modesKept: 8, cutoff: 0.5, restrictedCut: options.restricted ? { rule: 'sqrtN' } : null, generalizedEigenvalues: [], renyi: options.renyi ?? null },
    mutualInformation: options.pairI === undefined ? null : {
      I: options.pairI, a: { S: 0.4, n: 10, modesKept: 4, cutoff: 0.1 }, b: { S: 0.5, n: 11, modesKept: 4, cutoff: 0.1 }, union: { S: 0.9 - options.pairI, n: 21, modesKept: 8, cutoff: 0.1 },
    },
    complement: null, backend: 'ml-matrix', engineVersion: 'tacet-engine 0.1.0', timings: {}, ...(options.engine ? { engine: options.engine } : {}),
  };
  return {
    id, title: options.title === undefined ? `run ${id}` : options.title, status: 'done', stage: null, percent: 100, author: { id: 'u', name: 'Ada' },
    createdAt: '2026-01-01T00:00:00.000Z', startedAt: null, finishedAt: null, dimension: 2, regionKind: 'diamond2d', N, truncation: 'sqrtN',
    restrictedCut: options.restricted ? 'sqrtN' : null, S: options.S ?? null, parentRunId: null, error: null, cancelRequested: false,
    request: {
      mass: options.mass ?? 0,
      truncation: { rule: 'sqrtN' },
      doubleTruncation: options.restricted ?? false,
      ...(options.S !== undefined ? { subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } } } : {}),
      sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: N, seed: options.seed ?? 'a', prng: 'arc4' },
    },
    result,
  } as RunDetail;
}

describe('the compare selection in the URL', () => {
  it('reads ?ids= (the runs list link) and ?runs=, trimmed, without repeats, at most six, in order', () => {
    expect(compareSelection(new URLSearchParams('ids=b, a,b'))).toEqual(['b', 'a']);
    expect(compareSelection(new URLSearchParams('runs=x,y'))).toEqual(['x', 'y']);
    expect(compareSelection(new URLSearchParams('ids=1,2,3,4,5,6,7'))).toHaveLength(6);
    expect(compareSelection(new URLSearchParams(''))).toEqual([]);
  });

  it('writes a selection back as the page reads it', () => {
    const ids = ['2a2f7d25-1111-4000-8000-000000000000', '0123abcd-0000-4000-8000-000000000000'];
    expect(compareSearch(ids)).toBe(`?ids=${ids.join(',')}`);
    expect(compareSelection(new URLSearchParams(compareSearch(ids)))).toEqual(ids);
  });
});

describe('the settings that differ', () => {
  it('lists only the rows in which the runs differ, with each run’s value', () => {
    const runs = [doneRun('r1', { seed: 'alpha', S: 0.5 }), doneRun('r2', { seed: 'beta', S: 0.6 })];
    const rows = differingSettings(runs);
    expect(rows.map((r) => r.key)).toEqual(['seed']);
    expect(rows[0]!.values).toEqual(['alpha', 'beta']);
  });

  it('names rule, restricted cut, seed, mass, engine, N, region and subregion, and finds each difference', () => {
    const base = doneRun('r1', { S: 0.5 });
    expect(settingRows([base]).map((r) => r.key)).toEqual(['rule', 'restrictedCut', 'seed', 'mass', 'engine', 'N', 'region', 'subregion']);
    const other = doneRun('r2', { S: 0.5, mass: 0.5, N: 300, engine: 'structured', restricted: true });
    const rows = Object.fromEntries(differingSettings([base, other]).map((r) => [r.key, r.values]));
    expect(rows).toEqual({ restrictedCut: ['none', '√n/(4π)'], mass: ['0', '0.5'], engine: ['dense', 'structured'], N: ['200', '300'] });
    // no subregion on one side: the subregion row differs too
    expect(differingSettings([base, doneRun('r3')]).map((r) => r.key)).toEqual(['subregion']);
  });

  it('is empty when every setting agrees', () => {
    expect(differingSettings([doneRun('r1', { S: 0.5 }), doneRun('r2', { S: 0.7 })])).toEqual([]);
  });
});

describe('entropies side by side and their files', () => {
  const runs = [
    doneRun('r1', { seed: 'alpha', S: 0.5123456789, renyi: { '2': 0.4, inf: 0.3 } }),
    doneRun('r2', { seed: 'beta', S: 0.6, renyi: { '0.5': 0.7 }, pairI: 0.05 }),
    doneRun('r3', { seed: 'gamma' }),
  ];

  it('gives each run its n, S, S_α, I(A:B) and nothing where it asked for none', () => {
    const rows = entropyRows(runs);
    expect(rows.map((r) => [r.n, r.S, r.I])).toEqual([[40, 0.5123456789, null], [40, 0.6, 0.05], [null, null, null]]);
    expect(renyiKeysOf(rows)).toEqual(['0.5', '2', 'inf']);
    expect(rows[0]!.rule).toBe('√N/(4π)');
  });

  it('plots one series per quantity, with points only for runs that have it', () => {
    const traces = entropyCompareTraces(entropyRows(runs), { data: 'ink', dataSoft: 'soft', cut: 'accent', reference: 'sage' });
    expect(traces.map((t) => t.name)).toEqual(['S', 'S_0.5', 'S_2', 'S_∞', 'I(A:B)']);
    expect(traces[0]!.x).toEqual(['run r1', 'run r2']);
    expect(traces[4]!.y).toEqual([0.05]);
  });

  it('writes the CSV from the same rows, at 17 significant digits, and it parses', () => {
    const csv = compareCsv(runs);
    // Python's csv module as the outside reader (RFC 4180 quoting)
    const [header, ...lines] = runPython<string[][]>('import csv, io, json, sys\nprint(json.dumps(list(csv.reader(io.StringIO(json.load(sys.stdin))))))', csv);
    expect(header).toEqual(['run_id', 'label', 'cut_rule', 'restricted_cut', 'seed', 'mass', 'engine', 'N', 'region', 'subregion', 'n', 'S', 'S_alpha_0.5', 'S_alpha_2', 'S_alpha_inf', 'I', 'S_A', 'S_B', 'S_AB', 'S_Oprime']);
    expect(lines).toHaveLength(3);
    const S = header!.indexOf('S');
    // 17 significant digits give back the same double (IEEE 754 §5.12.2, common practice)
    expect(lines[0]![S]).toBe((0.5123456789).toPrecision(17));
    expect(Number(lines[0]![S])).toBe(0.5123456789);
    expect(lines[2]![S]).toBe('');
    expect(lines.map((l) => l[header!.indexOf('seed')])).toEqual(['alpha', 'beta', 'gamma']);
    // region and subregion texts hold commas, so they are quoted and read back whole
    expect(csv).toContain('"diamond from (-0.5, 0) to (0.5, 0)"');
    expect(lines[0]![header!.indexOf('subregion')]).toBe('diamond from (-0.5, 0) to (0.5, 0)');
    expect(lines.every((l) => l.length === header!.length)).toBe(true);
  });

  it('writes the JSON with the settings table, the entropy rows and each spectrum', () => {
    const json = JSON.parse(compareJson(runs, new Date('2026-01-02T00:00:00Z')));
    expect(json.format).toBe('tacet-compare/1');
    expect(json.runs).toEqual(['r1', 'r2', 'r3']);
    expect(json.settings.find((s: { key: string }) => s.key === 'seed')).toMatchObject({ differs: true, values: ['alpha', 'beta', 'gamma'] });
    expect(json.settings.find((s: { key: string }) => s.key === 'mass').differs).toBe(false);
    expect(json.entropies[1].I).toBe(0.05);
    expect(json.spectra[0]).toEqual({ id: 'r1', N: 200, eigenvalues: [3, 2, 1], cutoff: 1.125, modesKept: 2 });
  });

  it('tells apart runs with the same title by their short id', () => {
    expect(distinctLabels([{ id: 'aaaaaaaa-1', title: 'same' }, { id: 'bbbbbbbb-2', title: 'same' }, { id: 'c', title: 'other' }])).toEqual([
      'same (aaaaaaaa)',
      'same (bbbbbbbb)',
      'other',
    ]);
  });
});
