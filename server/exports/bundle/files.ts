import type { BundleEntropy } from '@shared/bundles';
import { formatWithError } from '@shared/precision';
import { pointsCsv } from '../runs';
import { csvField } from '../studies/csv';
import { escapeLatex } from '../studies/common';

/** The elements of one causal set as the points export writes them (17 significant digits, element order). */
export function coordinatesCsv(flat: Float64Array, dimension: 2 | 4): string {
  const rows: number[][] = [];
  for (let i = 0; i < flat.length / dimension; i++) rows.push(Array.from(flat.subarray(i * dimension, (i + 1) * dimension)));
  return pointsCsv({ columns: dimension === 2 ? ['t', 'x'] : ['t', 'x', 'y', 'z'], points: rows });
}

/** A closed relation (bit j of row i set iff i ≺ j, ⌈N/32⌉ words a row) as `i,j` rows, the relation-list import format. */
export function relationsCsv(words: Uint32Array, count: number): string {
  const perRow = (count + 31) >>> 5;
  const lines = ['i,j'];
  for (let i = 0; i < count; i++) {
    for (let k = 0; k < perRow; k++) {
      let bits = words[i * perRow + k]!;
      while (bits !== 0) {
        const low = bits & -bits;
        lines.push(`${i},${(k << 5) + (31 - Math.clz32(low))}`);
        bits ^= low;
      }
    }
  }
  return lines.join('\n') + '\n';
}

/** The inverse of relationsCsv: the packed rows of the listed pairs (a relation written by a bundle is already closed). */
export function relationWordsFromCsv(text: string, count: number): Uint32Array {
  const perRow = (count + 31) >>> 5;
  const words = new Uint32Array(perRow * count);
  const lines = text.split(/\r?\n/);
  lines.forEach((line, k) => {
    if (line.trim() === '' || (k === 0 && line.trim() === 'i,j')) return;
    const [i, j] = line.split(',').map(Number);
    if (!Number.isInteger(i) || !Number.isInteger(j) || i! < 0 || j! < 0 || i! >= count || j! >= count) throw new Error(`row ${k + 1} is not a pair of labels below ${count}: "${line}"`);
    words[i! * perRow + (j! >>> 5)]! |= 1 << (j! & 31);
  });
  return words;
}

/** The inverse of coordinatesCsv: flat coordinates and the dimension from the header. */
export function coordinatesFromCsv(text: string): { points: Float64Array; dimension: 2 | 4 } {
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '');
  const header = lines[0]?.trim();
  const dimension = header === 't,x' ? 2 : header === 't,x,y,z' ? 4 : null;
  if (!dimension) throw new Error(`the header must be t,x or t,x,y,z, got "${header ?? ''}"`);
  const points = new Float64Array((lines.length - 1) * dimension);
  for (let r = 1; r < lines.length; r++) {
    const cells = lines[r]!.split(',');
    if (cells.length !== dimension) throw new Error(`row ${r + 1} has ${cells.length} values, the header ${dimension}`);
    cells.forEach((c, k) => {
      const v = Number(c);
      if (c.trim() === '' || !Number.isFinite(v)) throw new Error(`row ${r + 1} holds "${c}", not a number`);
      points[(r - 1) * dimension + k] = v;
    });
  }
  return { points, dimension };
}

/** A file name part from a seed or a label: letters, digits, dot, dash and underscore only. */
export const fileSlug = (text: string) => text.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 60) || '_';

/** One row per entropy of a runs bundle: the run, its rule and subregion, n and S (and a pair's parts). */
export function runEntropiesCsv(entries: BundleEntropy[]): string {
  const lines = ['run,N,seed,rule,subregion,n,S,S_A,S_B,I'];
  for (const e of entries) {
    lines.push(
      [e.source.id, e.N, csvField(e.seed ?? ''), csvField(e.ruleKey), csvField(e.subregionKey), e.n, e.S.toPrecision(17), e.pair?.SA.toPrecision(17) ?? '', e.pair?.SB.toPrecision(17) ?? '', e.pair?.I.toPrecision(17) ?? ''].join(','),
    );
  }
  return lines.join('\n') + '\n';
}

/** The runs bundle's entropies as a booktabs table, S by the one precision rule of shared/precision.ts. */
export function runEntropiesLatex(entries: BundleEntropy[], ruleLabels: Record<string, string>): string {
  const rows = entries.map((e) =>
    [
      `\\texttt{${e.source.id.slice(0, 8)}}`,
      String(e.N),
      escapeLatex(ruleLabels[e.ruleKey] ?? e.ruleKey),
      e.pair ? 'A$\\cup$B' : escapeLatex(e.subregionKey),
      String(e.n),
      `$${formatWithError(e.S, null, 'latex')}$`,
      e.pair ? `$${formatWithError(e.pair.I, null, 'latex')}$` : '--',
    ].join(' & ') + ' \\\\',
  );
  return [
    '% Requires \\usepackage{booktabs}',
    '\\begin{table}',
    '  \\centering',
    '  \\begin{tabular}{lrlrrrr}',
    '    \\toprule',
    '    run & $N$ & rule & subregion & $n$ & $S$ & $I(A{:}B)$ \\\\',
    '    \\midrule',
    ...rows.map((r) => `    ${r}`),
    '    \\bottomrule',
    '  \\end{tabular}',
    `  \\caption{Spacetime entanglement entropy $S$ of ${entries.length} subregion${entries.length === 1 ? '' : 's'} of vacuum runs computed with Tacet; $n$ is the number of elements in the subregion.}`,
    '\\end{table}',
    '',
  ].join('\n');
}

/** README.md of a bundle: what each file is and how to check it. */
export function bundleReadme(input: { heading: string; lines: string[]; files: { path: string; what: string }[] }): string {
  return [
    `# ${input.heading}`,
    '',
    ...input.lines,
    '',
    '## Files',
    '',
    ...input.files.map((f) => `- \`${f.path}\` — ${f.what}`),
    '- `manifest.json` — the engine version, the SHA-256 of every other file (`files`) and every entropy with what it was computed from (`entropies`: its points file, seed, N, region, density, mass, rule and restricted cut, subregion as tips or element list, n and S)',
    '',
    '## Checking it',
    '',
    '`npx tacet reproduce THIS.zip` (in a Tacet checkout) checks every file against its SHA-256, refuses the bundle when one differs or is missing, computes every entropy again from the points in the bundle alone and prints how far the values are from the stored ones (`--json` for `{ checked, maxRelDiff, ok }`).',
    '',
  ].join('\n');
}
