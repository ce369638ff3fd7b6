import { describe, expect, it } from 'vitest';
import { createStudyRequestSchema, type SprinkledStudyRequest, type StudyEntropy } from '@shared/studies';
import { aggregateEntropies, fitAggregates } from '../../server/studies/aggregate';
import {
  aggregatesCsv,
  bibtex,
  csvField,
  escapeLatex,
  formatWithUncertainty,
  latexTable,
  methodsParagraph,
  provenanceJson,
  referencesUsed,
  tidyCsv,
  type StudyExportInput,
} from '../../server/exports/studies';
import { resolveSubregions } from '../../server/studies/plan';

const request = createStudyRequestSchema.parse({
  title: 'Entropy & 50% of the {diamond} #1_test ~ ^',
  counts: [200, 400],
  seeds: ['a,1', 'b'],
  subregions: { kind: 'concentric', fractions: [0.5] },
  rules: [{ truncation: { rule: 'none' } }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
}) as SprinkledStudyRequest;

function input(): StudyExportInput {
  const entropies: StudyEntropy[] = [];
  for (const N of [200, 400]) {
    for (const seed of request.seeds) {
      for (const rule of ['none', 'sqrtN+double']) {
        const n = N / 4 + (seed === 'b' ? 3 : 0);
        entropies.push({
          cellId: `${N}-${seed}`, N, elements: N, seed, subregion: 'l/L=0.5', fraction: 0.5, rule, n,
          S: rule === 'none' ? 0.25 * n : Math.log(Math.sqrt(n)) / 3 + (seed === 'b' ? 0.05 : 0),
          modesKept: 10, cutoff: 0.1, stateModesKept: 20, stateCutoff: 0.2,
        });
      }
    }
  }
  const aggregates = aggregateEntropies(entropies);
  return {
    id: '0123abcd-0000-4000-8000-000000000000', title: request.title!, status: 'done', author: 'Tomas Okafor',
    createdAt: '2026-01-01T00:00:00.000Z', finishedAt: '2026-01-01T00:01:00.000Z', request, causalSets: [],
    subregions: resolveSubregions(request), entropies, aggregates, fits: fitAggregates(aggregates),
    cells: [{ id: '200-a,1', N: 200, seed: 'a,1', status: 'done', elements: 200, backend: 'native', engineVersion: 'tacet-engine 0.1.0', startedAt: null, finishedAt: null, timings: { spectrum: 0.1 }, states: [], error: null }],
  };
}

/** Checks that \begin{x} … \end{x} nest properly (what a LaTeX run would reject first). */
function environmentsBalanced(tex: string): boolean {
  const stack: string[] = [];
  for (const m of tex.matchAll(/\\(begin|end)\{([^}]+)\}/g)) {
    if (m[1] === 'begin') stack.push(m[2]!);
    else if (stack.pop() !== m[2]) return false;
  }
  return stack.length === 0;
}

/** Braces balance once escaped ones (\{ \}) are removed. */
function bracesBalanced(tex: string): boolean {
  let depth = 0;
  for (const c of tex.replace(/\\[{}]/g, '')) {
    if (c === '{') depth++;
    if (c === '}' && --depth < 0) return false;
  }
  return depth === 0;
}

describe('LaTeX table', () => {
  const tex = latexTable(input());

  it('is structurally sound: balanced environments and braces, booktabs rules in order', () => {
    expect(environmentsBalanced(tex)).toBe(true);
    expect(bracesBalanced(tex)).toBe(true);
    // booktabs (common practice): \toprule, \midrule, \bottomrule once per tabular, in that order
    for (const body of tex.split('\\begin{tabular}').slice(1)) {
      const order = [...body.matchAll(/\\(toprule|midrule|bottomrule)\b/g)].map((m) => m[1]);
      expect(order).toEqual(['toprule', 'midrule', 'bottomrule']);
    }
    expect(tex).not.toMatch(/\\hline/);
    // every row of the aggregate table has as many cells as the column spec: 4 + one per rule
    const first = tex.slice(tex.indexOf('\\midrule'), tex.indexOf('\\bottomrule'));
    const dataRows = first.split('\n').filter((l) => l.trim().endsWith('\\\\'));
    expect(dataRows).toHaveLength(2);
    for (const row of dataRows) expect(row.split(' & ')).toHaveLength(6);
    expect(tex).toContain('\\begin{tabular}{rlrrcc}');
  });

  it('escapes the special characters of user text and gives each mean its uncertainty', () => {
    expect(tex).toContain('Entropy \\& 50\\% of the \\{diamond\\} \\#1\\_test \\textasciitilde{} \\textasciicircum{}');
    expect(tex).toMatch(/\\pm/);
    expect(tex).toContain('\\caption{');
    expect(tex).toMatch(/N \\in \\\{200, 400\\\}/);
    expect(tex).toContain('a,1');
    expect(escapeLatex('a\\b')).toBe('a\\textbackslash{}b');
  });

  it('names each rule once in the caption', () => {
    const caption = /\\caption\{(.*)\}\n/.exec(tex)![1]!;
    expect(caption).not.toMatch(/untruncated \(untruncated/);
    expect(caption).not.toMatch(/double-truncated \(double-truncated/);
    expect(caption).toContain('Rules: untruncated; double-truncated (state');
    const sentences = caption.split(/(?<=\.) /).filter((t) => t.length > 20);
    expect(new Set(sentences).size).toBe(sentences.length);
  });

  it('rounds a value to the decimal place of its uncertainty by the precision rule (two digits for a leading 1 or 2, else one)', () => {
    expect(formatWithUncertainty(1.86431, 0.03124)).toBe('1.86 \\pm 0.03');
    expect(formatWithUncertainty(1.86431, 0.01724)).toBe('1.864 \\pm 0.017');
    expect(formatWithUncertainty(123.456, 4.2)).toBe('123 \\pm 4');
    expect(formatWithUncertainty(57.3, 12)).toBe('57 \\pm 12');
    expect(formatWithUncertainty(0.123456, null)).toBe('0.1235');
  });
});

describe('CSV, JSON, BibTeX and methods', () => {
  it('quotes CSV fields that need it and writes full precision', () => {
    expect(csvField('a,1')).toBe('"a,1"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    const tidy = tidyCsv(input().entropies, input().request.rules).trimEnd().split('\n');
    expect(tidy).toHaveLength(1 + 8);
    expect(tidy[1]).toContain('"a,1"');
    // S = n/4 = 12.5 for N = 200, seed a,1, untruncated: written with 17 significant digits
    // rule key, then its two cuts spelled out (state rule, restricted cut)
    expect(tidy[1]).toContain(',none,none,none,50,12.500000000000000,');
    const agg = aggregatesCsv(input().aggregates, input().request.rules).trimEnd().split('\n');
    expect(agg).toHaveLength(1 + 4);
  });

  it('cites Sorkin–Yazdi 2018 only when a rule truncates at √N/4π or doubly', () => {
    expect(referencesUsed(request)).toContain('sorkin2018');
    const plain = createStudyRequestSchema.parse({ ...request, rules: [{ truncation: { rule: 'none' } }] });
    expect(referencesUsed(plain)).not.toContain('sorkin2018');
    const bib = bibtex(request);
    expect(bib.match(/^@\w+\{/gm)).toHaveLength(referencesUsed(request).length);
    expect(bracesBalanced(bib)).toBe(true);
    expect(bib).toContain('1205.2953');
    expect(bib).toContain('{214006}');
  });

  it('writes a methods paragraph with its citations and cautions', () => {
    const text = methodsParagraph(input());
    for (const key of referencesUsed(request)) expect(text).toContain(`[${key}]`);
    expect(text).toMatch(/finite-size/);
    expect(text).toMatch(/truncation rule is a modelling choice/);
    expect(text).toMatch(/ensemble means over 2 sprinklings/);
    expect(text).toContain('b = 1/3');
  });

  it('keeps the full provenance in JSON', () => {
    const json = provenanceJson(input(), new Date('2026-02-02T00:00:00Z'));
    expect(json).toMatchObject({ format: 'tacet-study/1', exportedAt: '2026-02-02T00:00:00.000Z', seeds: ['a,1', 'b'] });
    expect((json.engine as { versions: string[] }).versions).toEqual(['tacet-engine 0.1.0']);
    expect((json.rules as { key: string }[]).map((r) => r.key)).toEqual(['none', 'sqrtN+double']);
  });
});
