import type { ResolvedSubregion, StudyCausalSet, StudyRule } from '@shared/studies';
import { studyRuleKey, studyRuleLabel } from '@shared/studies';
import { escapeLatex, formatWithUncertainty, regionText, studyCautions, type StudyExportInput } from './common';

function latexRule(rule: string): string {
  if (rule === 'none') return 'untruncated';
  if (rule === 'sqrtN+double') return 'double-truncated';
  return `\\texttt{${escapeLatex(rule)}}`;
}

/** A rule in the caption: its key and its label, which names the restricted cut of double truncation. */
function latexRuleDescription(rule: StudyRule): string {
  return `${latexRule(studyRuleKey(rule))} (${escapeLatex(studyRuleLabel(rule))})`;
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
  const lines: string[] = [];
  const id8 = input.id.slice(0, 8);
  lines.push(`% Tacet scaling study ${input.id}${input.title ? ` (${input.title.replace(/[\r\n]+/g, ' ')})` : ''}`);
  lines.push('% Needs \\usepackage{booktabs} in the preamble.');
  lines.push('\\begin{table}[htbp]');
  lines.push('  \\centering');
  const what = concentric ? 'concentric sub-diamonds of size $\\ell/L$' : input.subregions.every((s) => s.elements) ? 'listed subsets of elements' : 'sub-diamonds';
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
  lines.push(`    $N$ & ${concentric ? '$\\ell/L$' : 'subregion'} & seeds & $\\langle n \\rangle$ & ${rules.map((r) => `$\\langle S \\rangle$ ${latexRule(r)}`).join(' & ')} \\\\`);
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

  if (input.fits.length > 0) {
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
    lines.push(`    rule & ${concentric ? '$\\ell/L$' : 'subregion'} & points & $b$ & $c$ & $R^2$ & $a$ (volume law) \\\\`);
    lines.push('    \\midrule');
    const logFits = input.fits.filter((f) => f.model === 'log');
    for (const f of logFits) {
      const linear = input.fits.find((g) => g.model === 'linear' && g.rule === f.rule && g.subregion === f.subregion);
      const where = f.subregion === null ? 'all' : (subregionName.get(f.subregion) ?? escapeLatex(f.subregion));
      const r2 = f.rSquared === null ? '--' : f.rSquared.toFixed(3);
      const slope = linear ? `$${formatWithUncertainty(linear.slope, linear.slopeError)}$` : '--';
      lines.push(
        `    ${latexRule(f.rule)} & ${where} & ${f.points} & $${formatWithUncertainty(f.slope, f.slopeError)}$ & $${formatWithUncertainty(f.intercept, f.interceptError)}$ & ${r2} & ${slope} \\\\`,
      );
    }
    lines.push('    \\bottomrule');
    lines.push('  \\end{tabular}');
    lines.push('\\end{table}');
  }
  return lines.join('\n') + '\n';
}
