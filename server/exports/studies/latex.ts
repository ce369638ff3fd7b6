import type { ResolvedSubregion, StudyAggregate, StudyCausalSet, StudyRule } from '@shared/studies';
import { fitQuantity, pairDecaySentence, renyiQuantity, studyRenyiKeys, studyRuleKey, studyRuleLabel } from '@shared/studies';
import { escapeLatex, formatWithUncertainty, regionText, studyCautions, type StudyExportInput } from './common';
import { formatQuantity } from '@shared/precision';

function latexRule(rule: string): string {
  if (rule === 'none') return 'untruncated';
  if (rule === 'sqrtN+double') return 'double-truncated';
  return `\\texttt{${escapeLatex(rule)}}`;
}

/**
 * A rule in the caption: its column name and its label, which names the restricted cut of double
 * truncation; once only when the label already starts with the column name ("untruncated", not
 * "untruncated (untruncated)").
 */
function latexRuleDescription(rule: StudyRule): string {
  const column = latexRule(studyRuleKey(rule));
  const label = escapeLatex(studyRuleLabel(rule));
  return label.startsWith(column) ? label : `${column} (${label})`;
}

function seedList(seeds: string[]): string {
  const shown = seeds.slice(0, 6).map(escapeLatex).join(', ');
  return seeds.length > 6 ? `${shown}, \\dots` : shown;
}

function importedSetList(sets: StudyCausalSet[]): string {
  const shown = sets.slice(0, 4).map((c) => `${escapeLatex(c.name)}, \\texttt{${escapeLatex(c.fileName)}}, SHA-256 \\texttt{${c.checksum.slice(0, 12)}}\\dots`).join('; ');
  return sets.length > 4 ? `${shown}; \\dots` : shown;
}

const subregionLatex = (s: ResolvedSubregion) => (s.fraction !== null ? `${s.fraction}` : escapeLatex(s.label));

/**
 * The aggregate table for a paper (needs \usepackage{booktabs}): one row per (N, subregion), one
 * column ⟨S⟩ ± standard error per rule, and a second table with the fits. The caption lists the
 * parameters, so the table can stand on its own.
 */
export function latexTable(input: StudyExportInput): string {
  const { request } = input;
  const rules = request.rules.map((r) => studyRuleKey(r));
  const byKey = new Map(input.aggregates.map((a) => [`${a.N}|${a.subregion}|${a.rule}`, a]));
  const concentric = input.subregions.every((s) => s.fraction !== null);
  const pairs = input.subregions.some((s) => s.pair);
  const lines: string[] = [];
  const id8 = input.id.slice(0, 8);
  lines.push(`% Tacet scaling study ${input.id}${input.title ? ` (${input.title.replace(/[\r\n]+/g, ' ')})` : ''}`);
  lines.push('% Needs \\usepackage{booktabs} in the preamble.');
  lines.push('\\begin{table}[htbp]');
  lines.push('  \\centering');
  const what = pairs
    ? 'the union $A \\cup B$ of pairs of equal sub-diamonds of size $\\ell/T$ a gap $d/T$ apart'
    : concentric
      ? 'concentric sub-diamonds of size $\\ell/T$'
      : input.subregions.every((s) => s.elements)
        ? 'listed subsets of elements'
        : 'sub-diamonds';
  const caption = [
    input.title ? `${escapeLatex(input.title)}. ` : '',
    request.source === 'sprinkled'
      ? `Spacetime entanglement entropy $S$ of ${what} in ${regionText(request.region)}, ` +
        `${request.process === 'fixed' ? 'fixed-$N$' : 'Poisson'} sprinklings (PRNG seedrandom ${escapeLatex(request.prng)}) with $N \\in \\{${[...request.counts].sort((a, b) => a - b).join(', ')}\\}$, ` +
        `${request.seeds.length} seed${request.seeds.length === 1 ? '' : 's'} per $N$ (${seedList(request.seeds)}), field mass $m = ${request.mass}$. `
      : `Spacetime entanglement entropy $S$ of ${what} of ${input.causalSets.length} imported causal set${input.causalSets.length === 1 ? '' : 's'} ` +
        `(${importedSetList(input.causalSets)}) with $N \\in \\{${[...new Set(input.causalSets.map((c) => c.N))].sort((a, b) => a - b).join(', ')}\\}$, field mass $m = ${request.mass}$. `,
    `Means over ${request.source === 'sprinkled' ? 'seeds' : 'the causal sets of each $N$'} with their standard errors; $\\langle n \\rangle$ is the mean number of elements in the subregion. `,
    `Rules: ${request.rules.map(latexRuleDescription).join('; ')}.`,
    ...studyCautions(input).map((c) => ` Caution: ${escapeLatex(c)}`),
  ].join('');
  lines.push(`  \\caption{${caption}}`);
  lines.push(`  \\label{tab:tacet-study-${id8}}`);
  lines.push(`  \\begin{tabular}{rlrr${'c'.repeat(rules.length)}}`);
  lines.push('    \\toprule');
  lines.push(`    $N$ & ${concentric ? '$\\ell/T$' : 'subregion'} & seeds & $\\langle n \\rangle$ & ${rules.map((r) => `$\\langle S \\rangle$ ${latexRule(r)}`).join(' & ')} \\\\`);
  lines.push('    \\midrule');
  const counts = [...new Set(input.aggregates.map((a) => a.N))].sort((a, b) => a - b);
  counts.forEach((N, k) => {
    if (k > 0) lines.push('    \\addlinespace');
    for (const s of input.subregions) {
      const cells = rules.map((r) => byKey.get(`${N}|${s.key}|${r}`));
      const any = cells.find((c) => c !== undefined);
      if (!any) continue;
      const values = cells.map((c) => (c ? `$${formatWithUncertainty(c.meanS, c.seS)}$` : '--'));
      lines.push(`    ${N} & ${subregionLatex(s)} & ${any.seeds} & ${any.meanN.toFixed(1)} & ${values.join(' & ')} \\\\`);
    }
  });
  lines.push('    \\bottomrule');
  lines.push('  \\end{tabular}');
  lines.push('\\end{table}');

  if (input.fits.some((f) => f.model === 'log' && fitQuantity(f) === 'S')) {
    const subregionName = new Map(input.subregions.map((s) => [s.key, subregionLatex(s)]));
    lines.push('');
    lines.push('\\begin{table}[htbp]');
    lines.push('  \\centering');
    lines.push(
      `  \\caption{Weighted least-squares fits to the ensemble means of table~\\ref{tab:tacet-study-${id8}}: $S = b \\ln\\sqrt{\\langle n \\rangle} + c$ and $S = a \\langle n \\rangle + c'$, ` +
        `weights $1/\\sigma^2$ from the standard errors (unweighted where a mean rests on one seed). The continuum value for one free boson is $b = 1/3$ (Calabrese--Cardy 2004).}`,
    );
    lines.push(`  \\label{tab:tacet-study-${id8}-fits}`);
    lines.push('  \\begin{tabular}{llrcccc}');
    lines.push('    \\toprule');
    lines.push(`    rule & ${concentric ? '$\\ell/T$' : 'subregion'} & points & $b$ & $c$ & $R^2$ & $a$ (volume law) \\\\`);
    lines.push('    \\midrule');
    const logFits = input.fits.filter((f) => f.model === 'log' && fitQuantity(f) === 'S');
    for (const f of logFits) {
      const linear = input.fits.find((g) => g.model === 'linear' && g.rule === f.rule && g.subregion === f.subregion);
      const where = f.subregion === null ? 'all' : (subregionName.get(f.subregion) ?? escapeLatex(f.subregion));
      const r2 = f.rSquared === null ? '--' : formatQuantity(f.rSquared, 'fit', 'latex');
      const slope = linear ? `$${formatWithUncertainty(linear.slope, linear.slopeError)}$` : '--';
      lines.push(
        `    ${latexRule(f.rule)} & ${where} & ${f.points} & $${formatWithUncertainty(f.slope, f.slopeError)}$ & $${formatWithUncertainty(f.intercept, f.interceptError)}$ & ${r2} & ${slope} \\\\`,
      );
    }
    lines.push('    \\bottomrule');
    lines.push('  \\end{tabular}');
    lines.push('\\end{table}');
  }
  lines.push(...renyiTables(input, id8), ...pairTables(input, id8));
  return lines.join('\n') + '\n';
}

const latexOrder = (key: string) => (key === 'inf' ? '\\infty' : key);

/**
 * One table of ⟨S_α⟩ ± SE per rule (rows (N, subregion), a column per α) and the fitted slope b_α of
 * S_α = b_α ln √n + c_α, when the study asked for Rényi orders.
 */
function renyiTables(input: StudyExportInput, id8: string): string[] {
  const keys = studyRenyiKeys(input.request);
  if (keys.length === 0) return [];
  const lines: string[] = [];
  const names = new Map(input.subregions.map((s) => [s.key, subregionLatex(s)]));
  for (const rule of input.request.rules) {
    const key = studyRuleKey(rule);
    const rows = input.aggregates.filter((a) => a.rule === key && a.renyi);
    if (rows.length === 0) continue;
    lines.push('');
    lines.push('\\begin{table}[htbp]');
    lines.push('  \\centering');
    lines.push(
      `  \\caption{R\\'enyi entropies $S_\\alpha = \\sum_{\\mu>1} \\ln[\\mu^\\alpha - (\\mu-1)^\\alpha]/(\\alpha-1)$ ($S_\\infty = \\sum_{\\mu>1} \\ln\\mu$) from the same generalised eigenvalues $\\mu$ as $S$ in table~\\ref{tab:tacet-study-${id8}}, ${latexRuleDescription(rule)}: means with standard errors; last row the slope $b_\\alpha$ of a weighted fit $S_\\alpha = b_\\alpha \\ln\\sqrt{\\langle n\\rangle} + c_\\alpha$ over all points.}`,
    );
    lines.push(`  \\label{tab:tacet-study-${id8}-renyi-${escapeLatex(key).replace(/[^A-Za-z0-9]/g, '')}}`);
    lines.push(`  \\begin{tabular}{rlr${'c'.repeat(keys.length)}}`);
    lines.push('    \\toprule');
    lines.push(`    $N$ & subregion & $\\langle n \\rangle$ & ${keys.map((k) => `$\\langle S_{${latexOrder(k)}} \\rangle$`).join(' & ')} \\\\`);
    lines.push('    \\midrule');
    for (const a of rows) {
      lines.push(`    ${a.N} & ${names.get(a.subregion) ?? escapeLatex(a.subregion)} & ${a.meanN.toFixed(1)} & ${keys.map((k) => (a.renyi![k] ? `$${formatWithUncertainty(a.renyi![k]!.mean, a.renyi![k]!.se)}$` : '--')).join(' & ')} \\\\`);
    }
    const slopes = keys.map((k) => input.fits.find((f) => f.rule === key && f.model === 'log' && f.subregion === null && fitQuantity(f) === renyiQuantity(k)));
    lines.push('    \\midrule');
    lines.push(`    \\multicolumn{3}{l}{$b_\\alpha$ (all points)} & ${slopes.map((f) => (f ? `$${formatWithUncertainty(f.slope, f.slopeError)}$` : '--')).join(' & ')} \\\\`);
    lines.push('    \\bottomrule');
    lines.push('  \\end{tabular}');
    lines.push('\\end{table}');
  }
  return lines;
}

/** ⟨I⟩ ± SE against d/T per (N, ℓ/T) with a column per rule, and the log-log fits beside the continuum trend. */
function pairTables(input: StudyExportInput, id8: string): string[] {
  const rows = input.aggregates.filter((a) => a.pair);
  if (rows.length === 0) return [];
  const rules = input.request.rules.map((r) => studyRuleKey(r));
  const byKey = new Map(rows.map((a) => [`${a.N}|${a.subregion}|${a.rule}`, a]));
  const lines: string[] = [''];
  lines.push('\\begin{table}[htbp]');
  lines.push('  \\centering');
  lines.push(
    `  \\caption{Mutual information $I(A{:}B) = S_A + S_B - S_{A\\cup B}$ of two equal sub-diamonds of proper time $\\ell$ on the central slice, a gap $d$ between their facing corners, in the same sprinklings as table~\\ref{tab:tacet-study-${id8}}: means over seeds with standard errors. With double truncation each of $A$, $B$ and $A \\cup B$ is cut at its own $\\sqrt{n}/(4\\pi)$, $n$ its element count. $I$ is a difference of large numbers, so its relative error exceeds that of $S$.}`,
  );
  lines.push(`  \\label{tab:tacet-study-${id8}-mutual-information}`);
  lines.push(`  \\begin{tabular}{rrr${'c'.repeat(rules.length)}}`);
  lines.push('    \\toprule');
  lines.push(`    $N$ & $\\ell/T$ & $d/T$ & ${rules.map((r) => `$\\langle I \\rangle$ ${latexRule(r)}`).join(' & ')} \\\\`);
  lines.push('    \\midrule');
  const counts = [...new Set(rows.map((a) => a.N))].sort((a, b) => a - b);
  const ordered = [...input.subregions.filter((s) => s.pair)].sort((p, q) => p.pair!.size - q.pair!.size || p.pair!.separation - q.pair!.separation);
  counts.forEach((N, k) => {
    if (k > 0) lines.push('    \\addlinespace');
    for (const s of ordered) {
      const cells: (StudyAggregate | undefined)[] = rules.map((r) => byKey.get(`${N}|${s.key}|${r}`));
      if (!cells.some((c) => c)) continue;
      const values = cells.map((c) => (c ? `$${formatWithUncertainty(c.pair!.meanI, c.pair!.seI)}$` : '--'));
      lines.push(`    ${N} & ${s.pair!.size} & ${s.pair!.separation} & ${values.join(' & ')} \\\\`);
    }
  });
  lines.push('    \\bottomrule');
  lines.push('  \\end{tabular}');
  lines.push('\\end{table}');
  const fits = input.fits.filter((f) => f.model === 'loglog');
  if (fits.length > 0) {
    lines.push('');
    lines.push('\\begin{table}[htbp]');
    lines.push('  \\centering');
    lines.push(
      `  \\caption{Decay of $\\langle I \\rangle$ with the separation: weighted fits $\\ln\\langle I\\rangle = p \\ln(d/T) + q$ per rule, $\\ell/T$ and $N$ over the separations with $\\langle I \\rangle > 0$ (table~\\ref{tab:tacet-study-${id8}-mutual-information}), beside the slope of the same fit through the continuum two-interval trend $I = \\tfrac13 \\ln[(\\ell+d)^2/(d(2\\ell+d))]$ of a $c = 1$ vacuum at the same $d/T$ (Calabrese--Cardy 2004; Casini--Huerta 2009; exact for a free Dirac fermion, a trend for the boson). Finite-size effects and the truncation, a modelling choice, shift both.}`,
    );
    lines.push(`  \\label{tab:tacet-study-${id8}-mutual-information-fits}`);
    lines.push('  \\begin{tabular}{lrrrccc}');
    lines.push('    \\toprule');
    lines.push('    rule & $N$ & $\\ell/T$ & points & $p$ (measured) & $p$ (continuum trend) & $d/T$ range \\\\');
    lines.push('    \\midrule');
    for (const f of fits) {
      const points = `${f.points}${f.excluded ? ` (${f.excluded} left out)` : ''}`;
      lines.push(
        `    ${latexRule(f.rule)} & ${f.N} & ${f.size} & ${points} & $${formatWithUncertainty(f.slope, f.slopeError)}$ & $${f.continuum ? formatQuantity(f.continuum.slope, 'fit', 'latex') : '--'}$ & ${f.continuum ? `$[${f.continuum.from}, ${f.continuum.to}]$` : '--'} \\\\`,
      );
    }
    lines.push('    \\bottomrule');
    lines.push('  \\end{tabular}');
    lines.push('\\end{table}');
    lines.push(...fits.map((f) => `% ${f.rule}, N = ${f.N}, l/T = ${f.size}: ${pairDecaySentence(f)}`));
  }
  return lines;
}
