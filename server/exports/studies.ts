import type { StudyExportFormat } from '@shared/exports';
import type { CreateStudyRequest, ResolvedSubregion, StudyAggregate, StudyCausalSet, StudyEntropy, StudyFit, StudyRule, StudyStatus } from '@shared/studies';
import { studyRuleKey, studyRuleLabel } from '@shared/studies';
import { regionDimension, regionLatex } from '@shared/regions';
import {
  effectiveRestrictedCut,
  formatRestrictedCut,
  formatTruncationRule,
  restrictedCutText,
  ruleCautions,
  type RegionSpec,
} from '@shared/vacuum';

/** What every export of a study is made from (the service loads it; these functions are pure). */
export interface StudyExportInput {
  id: string;
  title: string | null;
  status: StudyStatus;
  author: string;
  createdAt: string;
  finishedAt: string | null;
  request: CreateStudyRequest;
  /** the imported causal sets of a study over them, in cell order; empty for sprinklings */
  causalSets: StudyCausalSet[];
  subregions: ResolvedSubregion[];
  entropies: StudyEntropy[];
  aggregates: StudyAggregate[];
  fits: StudyFit[];
  cells: {
    id: string;
    N: number;
    seed: string;
    status: string;
    elements: number | null;
    backend: string | null;
    engineVersion: string | null;
    startedAt: string | null;
    finishedAt: string | null;
    timings: Record<string, number> | null;
    states: { rule: string; cutoff: number; modesKept: number }[] | null;
    error: string | null;
  }[];
}

/** 17 significant digits: every float64 reads back as the same number (IEEE 754 §5.12.2). */
const full = (v: number | null) => (v === null ? '' : v.toPrecision(17));

/** A CSV field quoted when it holds a comma, quote or line break (RFC 4180). */
export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

const csv = (header: string[], rows: (string | number)[][]) =>
  [header.join(','), ...rows.map((r) => r.map((c) => csvField(String(c))).join(','))].join('\n') + '\n';

/**
 * The two cuts of each rule key as CSV columns: the whole-region rule and the restricted cut of double
 * truncation ("none" without it), so a reader of the file needs no key to decode.
 */
function ruleColumns(rules: StudyRule[]): (key: string) => [string, string] {
  const byKey = new Map(rules.map((r) => {
    const restricted = effectiveRestrictedCut(r);
    return [studyRuleKey(r), [formatTruncationRule(r.truncation), restricted ? formatRestrictedCut(restricted) : 'none'] as [string, string]];
  }));
  return (key) => byKey.get(key) ?? ['', ''];
}

/** Tidy CSV: one row per computed entropy (one sprinkling, subregion and rule). */
export function tidyCsv(entropies: StudyEntropy[], rules: StudyRule[]): string {
  const columns = ruleColumns(rules);
  return csv(
    ['cell', 'N', 'elements', 'seed', 'subregion', 'l_over_L', 'rule', 'state_rule', 'restricted_cut', 'n', 'S', 'modes_kept', 'cutoff', 'state_modes_kept', 'state_cutoff'],
    entropies.map((e) => [
      e.cellId, e.N, e.elements, e.seed, e.subregion, e.fraction === null ? '' : String(e.fraction), e.rule, ...columns(e.rule), e.n, full(e.S),
      e.modesKept, full(e.cutoff), e.stateModesKept, full(e.stateCutoff),
    ]),
  );
}

/** The aggregate table: one row per (N, subregion, rule). */
export function aggregatesCsv(aggregates: StudyAggregate[], rules: StudyRule[]): string {
  const columns = ruleColumns(rules);
  return csv(
    ['N', 'subregion', 'l_over_L', 'rule', 'state_rule', 'restricted_cut', 'seeds', 'mean_elements', 'mean_n', 'mean_S', 'sd_S', 'se_S'],
    aggregates.map((a) => [
      a.N, a.subregion, a.fraction === null ? '' : String(a.fraction), a.rule, ...columns(a.rule), a.seeds, full(a.meanElements), full(a.meanN), full(a.meanS), full(a.sdS), full(a.seS),
    ]),
  );
}

/** The dimension of the study's regions: its region's, or that of its imported sets. */
export function studyDimension(input: Pick<StudyExportInput, 'request' | 'causalSets'>): 2 | 4 {
  if (input.request.source === 'sprinkled') return regionDimension(input.request.region.kind);
  return input.causalSets.some((c) => c.dimension === 4) ? 4 : 2;
}

/** The cautions of every rule of the study (shared/vacuum.ts ruleCautions), without repeats. */
export function studyCautions(input: Pick<StudyExportInput, 'request' | 'causalSets'>): string[] {
  const dimension = studyDimension(input);
  return [...new Set(input.request.rules.flatMap((r) => ruleCautions(dimension, r)))];
}

// ---- LaTeX ----

/** Escapes LaTeX's special characters in running text. */
export function escapeLatex(text: string): string {
  return text.replace(/[\\{}&%$#_~^]/g, (c) => {
    switch (c) {
      case '\\':
        return '\\textbackslash{}';
      case '~':
        return '\\textasciitilde{}';
      case '^':
        return '\\textasciicircum{}';
      default:
        return `\\${c}`;
    }
  })
    .replace(/ℓ/g, '$\\ell$')
    .replace(/√/g, '$\\surd$')
    .replace(/π/g, '$\\pi$')
    .replace(/λ/g, '$\\lambda$')
    .replace(/≤/g, '$\\leq$')
    .replace(/–/g, '--');
}

/**
 * A value with its uncertainty, the uncertainty to two significant digits and the value to the same
 * decimal place (common practice): 1.86431, 0.03124 → "1.864 \pm 0.031". Without an uncertainty,
 * four significant digits.
 */
export function formatWithUncertainty(value: number, error: number | null): string {
  if (error === null || !(error > 0) || !Number.isFinite(error)) return Number(value.toPrecision(4)).toString();
  const decimals = Math.max(0, 1 - Math.floor(Math.log10(error)));
  return `${value.toFixed(decimals)} \\pm ${error.toFixed(decimals)}`;
}

function latexRule(rule: string): string {
  if (rule === 'none') return 'untruncated';
  if (rule === 'sqrtN+double') return 'double-truncated';
  return `\\texttt{${escapeLatex(rule)}}`;
}

/** A rule in the caption: its key and its label, which names the restricted cut of double truncation. */
function latexRuleDescription(rule: StudyRule): string {
  return `${latexRule(studyRuleKey(rule))} (${escapeLatex(studyRuleLabel(rule))})`;
}

const regionText = (region: RegionSpec): string => regionLatex(region);

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

// ---- references ----

interface Reference {
  key: string;
  short: string;
  bibtex: string;
}

/**
 * The published methods a study uses (server/engine/README.md §3–§11). Bibliographic details recalled from
 * memory: check them against the journals before submission.
 */
const references: Record<string, Reference> = {
  bombelli1987: {
    key: 'bombelli1987',
    short: 'Bombelli, Lee, Meyer and Sorkin 1987',
    bibtex: `@article{bombelli1987,
  author  = {Bombelli, Luca and Lee, Joohan and Meyer, David and Sorkin, Rafael D.},
  title   = {Space-time as a causal set},
  journal = {Physical Review Letters},
  volume  = {59},
  pages   = {521--524},
  year    = {1987},
  doi     = {10.1103/PhysRevLett.59.521}
}`,
  },
  johnston2008: {
    key: 'johnston2008',
    short: 'Johnston 2008',
    bibtex: `@article{johnston2008,
  author  = {Johnston, Steven},
  title   = {Particle propagators on discrete spacetime},
  journal = {Classical and Quantum Gravity},
  volume  = {25},
  pages   = {202001},
  year    = {2008},
  eprint  = {0806.3083},
  archivePrefix = {arXiv}
}`,
  },
  johnston2009: {
    key: 'johnston2009',
    short: 'Johnston 2009',
    bibtex: `@article{johnston2009,
  author  = {Johnston, Steven},
  title   = {Feynman propagator for a free scalar field on a causal set},
  journal = {Physical Review Letters},
  volume  = {103},
  pages   = {180401},
  year    = {2009},
  eprint  = {0909.0944},
  archivePrefix = {arXiv}
}`,
  },
  sorkin2011: {
    key: 'sorkin2011',
    short: 'Sorkin 2011',
    bibtex: `@article{sorkin2011,
  author  = {Sorkin, Rafael D.},
  title   = {Scalar field theory on a causal set in histories form},
  journal = {Journal of Physics: Conference Series},
  volume  = {306},
  pages   = {012017},
  year    = {2011},
  eprint  = {1107.0698},
  archivePrefix = {arXiv}
}`,
  },
  afshordi2012: {
    key: 'afshordi2012',
    short: 'Afshordi, Aslanbeigi and Sorkin 2012',
    bibtex: `@article{afshordi2012,
  author  = {Afshordi, Niayesh and Aslanbeigi, Siavash and Sorkin, Rafael D.},
  title   = {A distinguished vacuum state for a quantum field in a curved spacetime: formalism, features, and cosmology},
  journal = {Journal of High Energy Physics},
  volume  = {2012},
  number  = {08},
  pages   = {137},
  year    = {2012},
  eprint  = {1205.1296},
  archivePrefix = {arXiv}
}`,
  },
  sorkin2012: {
    key: 'sorkin2012',
    short: 'Sorkin 2012',
    bibtex: `@misc{sorkin2012,
  author  = {Sorkin, Rafael D.},
  title   = {Expressing entropy globally in terms of (4D) field-correlations},
  year    = {2012},
  eprint  = {1205.2953},
  archivePrefix = {arXiv}
}`,
  },
  saravani2014: {
    key: 'saravani2014',
    short: 'Saravani, Sorkin and Yazdi 2014',
    bibtex: `@article{saravani2014,
  author  = {Saravani, Mehdi and Sorkin, Rafael D. and Yazdi, Yasaman K.},
  title   = {Spacetime entanglement entropy in 1+1 dimensions},
  journal = {Classical and Quantum Gravity},
  volume  = {31},
  pages   = {214006},
  year    = {2014},
  eprint  = {1311.7146},
  archivePrefix = {arXiv}
}`,
  },
  sorkin2018: {
    key: 'sorkin2018',
    short: 'Sorkin and Yazdi 2018',
    bibtex: `@article{sorkin2018,
  author  = {Sorkin, Rafael D. and Yazdi, Yasaman K.},
  title   = {Entanglement entropy in causal set theory},
  journal = {Classical and Quantum Gravity},
  volume  = {35},
  pages   = {074004},
  year    = {2018},
  eprint  = {1611.10281},
  archivePrefix = {arXiv}
}`,
  },
  calabrese2004: {
    key: 'calabrese2004',
    short: 'Calabrese and Cardy 2004',
    bibtex: `@article{calabrese2004,
  author  = {Calabrese, Pasquale and Cardy, John},
  title   = {Entanglement entropy and quantum field theory},
  journal = {Journal of Statistical Mechanics: Theory and Experiment},
  pages   = {P06002},
  year    = {2004},
  eprint  = {hep-th/0405152},
  archivePrefix = {arXiv}
}`,
  },
};

const usesSorkinYazdi = (request: CreateStudyRequest) => request.rules.some((r) => r.doubleTruncation || r.truncation.rule === 'sqrtN');

/** Keys of the references the study's methods rest on, in citation order. */
export function referencesUsed(request: CreateStudyRequest): string[] {
  const keys = ['bombelli1987', 'johnston2008', 'johnston2009', 'sorkin2011', 'afshordi2012', 'sorkin2012', 'saravani2014'];
  if (usesSorkinYazdi(request)) keys.push('sorkin2018');
  keys.push('calabrese2004');
  return keys;
}

/** BibTeX entries of the published methods used. */
export function bibtex(request: CreateStudyRequest): string {
  return (
    `% References for the methods of a Tacet scaling study. Details recalled from memory: check before submission.\n\n` +
    referencesUsed(request).map((k) => references[k]!.bibtex).join('\n\n') +
    '\n'
  );
}

const cite = (...keys: string[]) => `(${keys.map((k) => `${references[k]!.short} [${k}]`).join('; ')})`;

function regionPlain(region: RegionSpec): string {
  return regionText(region).replace(/\$/g, '').replace(/\\in/g, '∈').replace(/\\/g, '');
}

/**
 * A methods paragraph for a paper: what was computed, how, with which parameters, citing the
 * published methods (keys as in bibtex()), with the cautions a reader needs.
 */
export function methodsParagraph(input: StudyExportInput): string {
  const { request } = input;
  const subregions = request.subregions;
  const sizes =
    subregions.kind === 'concentric'
      ? `concentric sub-diamonds with ℓ/L ∈ {${subregions.fractions.join(', ')}}`
      : subregions.kind === 'tips'
        ? `${input.subregions.length} sub-diamond(s) given by their tips`
        : `${input.subregions.length} subregion(s) given as lists of elements`;
  const ensemble = request.source === 'sprinkled' ? request.seeds.length : input.causalSets.length;
  const unit = request.source === 'sprinkled' ? 'sprinkling' : 'causal set';
  const ruleTexts = request.rules.map((r) => {
    if (r.truncation.rule === 'none' && !r.doubleTruncation) return 'without truncation (only the numerical kernel of the restricted Pauli–Jordan operator, below 10⁻⁶ of its largest eigenvalue, is dropped)';
    const restricted = effectiveRestrictedCut(r);
    const second = restricted
      ? `the restricted operator again at ${restricted.rule === 'sqrtN' ? 'λ = √n/(4π), n the number of elements in the subregion' : `the fixed ${restrictedCutText(restricted)}`} (double truncation, ${references.sorkin2018!.short})`
      : '';
    if (r.truncation.rule === 'none') return `without truncating the SJ state of the whole region but cutting ${second} (restricted cut only)`;
    const whole = r.truncation.rule === 'sqrtN' ? `truncating the SJ state of the whole region at λ_c = √N/(4π) ${cite('sorkin2018')}` : `truncating the SJ state of the whole region with the rule ${studyRuleKey({ truncation: r.truncation })}`;
    return restricted ? `${whole} and ${second}` : whole;
  });
  const versions = [...new Set(input.cells.map((c) => c.engineVersion).filter((v): v is string => v !== null))];
  const backends = [...new Set(input.cells.map((c) => c.backend).filter((v): v is string => v !== null))];
  const mass = request.mass > 0 ? `a free scalar field of mass m = ${request.mass}, with the massive retarded Green function K_m = K(I + (m²/ρ)K)⁻¹` : 'a massless free scalar field';
  const sets = input.causalSets;
  const setCounts = [...new Set(sets.map((c) => c.N))].sort((a, b) => a - b);
  const origin =
    request.source === 'sprinkled'
      ? `We sprinkled ${request.process === 'fixed' ? 'exactly N points (the fixed-N variant of the Poisson process)' : 'points by a Poisson process of expected number N'} ${cite('bombelli1987')} into ${regionPlain(request.region)}, for N ∈ {${[...request.counts].sort((a, b) => a - b).join(', ')}} and ${request.seeds.length} independent seed${request.seeds.length === 1 ? '' : 's'} per N (pseudo-random generator seedrandom ${request.prng}; every seed is listed in the JSON export, so each sprinkling can be reproduced exactly).`
      : `We used ${sets.length} causal set${sets.length === 1 ? '' : 's'} generated outside Tacet and imported as ${[...new Set(sets.map((c) => (c.kind === 'coordinates' ? 'coordinate files' : 'relation lists')))].join(' and ')}, with N ∈ {${setCounts.join(', ')}} (${sets
          .map((c) => `${c.name}: ${c.fileName}, N = ${c.N}${c.region ? `, in ${regionPlain(c.region)}` : c.density !== null ? `, ρ = ${c.density}` : ''}`)
          .join('; ')}); the JSON export lists the SHA-256 checksum of every file, so each input can be checked.`;
  const text = [
    origin,
    `On each causal set we built the retarded Green function of ${mass} ${cite('johnston2008', 'johnston2009')}, the Pauli–Jordan operator iΔ = i(K − Kᵀ), and the Sorkin–Johnston state as the positive spectral part of iΔ ${cite('sorkin2011', 'afshordi2012')}, from one real symmetric eigendecomposition of ΔᵀΔ.`,
    `For ${sizes} we computed Sorkin's spacetime entanglement entropy S = Σ μ ln|μ| from the generalised eigenvalue problem W_O v = μ iΔ_O v restricted to the subregion ${cite('sorkin2012', 'saravani2014')}, ${ruleTexts.join('; and ')}.`,
    `For each N, subregion and rule we report the mean over ${request.source === 'sprinkled' ? 'seeds' : 'the causal sets of that N'} of S and of the number n of elements in the subregion, with the standard error of the mean, and fit by weighted least squares (weights 1/σ² from the standard errors) S = b ln √n + c and S = a n + c′. In the continuum a free boson gives b = 1/3 ${cite('calabrese2004')}; on causal sets this is recovered only after double truncation, while the untruncated entropy follows a spacetime volume law ${cite('saravani2014', 'sorkin2018')}.`,
    ...studyCautions(input).map((c) => `Caution: ${c}`),
    `Cautions: these are finite causal sets, so finite-size and finite-density effects bias the fitted coefficients, most at small n; the truncation rule is a modelling choice that changes the numbers, and a different cut gives a different b; and the quoted values are ensemble means over ${ensemble} ${unit}${ensemble === 1 ? '' : 's'} in all, whose single realisations scatter by a few tenths.`,
    `Computed with ${versions.join(', ') || 'the Tacet engine'} (linear algebra: ${backends.join(', ') || 'not recorded'}); study ${input.id}.`,
  ];
  return text.join(' ') + '\n';
}

/** JSON with the full provenance: request, seeds, rules, engine versions and backends, times, results. */
export function provenanceJson(input: StudyExportInput, exportedAt: Date = new Date()): Record<string, unknown> {
  return {
    format: 'tacet-study/1',
    exportedAt: exportedAt.toISOString(),
    study: {
      id: input.id,
      title: input.title,
      status: input.status,
      author: input.author,
      createdAt: input.createdAt,
      finishedAt: input.finishedAt,
    },
    request: input.request,
    source: input.request.source,
    seeds: input.request.source === 'sprinkled' ? input.request.seeds : null,
    /** the imported sets in cell order: a cell's seed is its set's id */
    causalSets: input.request.source === 'imported' ? input.causalSets : null,
    rules: input.request.rules.map((r) => ({
      key: studyRuleKey(r),
      label: studyRuleLabel(r),
      truncation: r.truncation,
      doubleTruncation: r.doubleTruncation,
      restrictedCut: effectiveRestrictedCut(r),
      cautions: ruleCautions(studyDimension(input), r),
    })),
    subregions: input.subregions,
    engine: {
      versions: [...new Set(input.cells.map((c) => c.engineVersion).filter((v) => v !== null))],
      backends: [...new Set(input.cells.map((c) => c.backend).filter((v) => v !== null))],
      prng: input.request.source === 'sprinkled' ? `seedrandom.${input.request.prng}` : null,
      process: input.request.source === 'sprinkled' ? input.request.process : 'imported',
    },
    cells: input.cells,
    entropies: input.entropies,
    aggregates: input.aggregates,
    fits: input.fits,
    references: referencesUsed(input.request),
  };
}

/** One renderer per format of shared/exports.ts `studyExports`. */
export const studyRenderers: Record<StudyExportFormat, (input: StudyExportInput) => string> = {
  csv: (input) => tidyCsv(input.entropies, input.request.rules),
  'aggregates-csv': (input) => aggregatesCsv(input.aggregates, input.request.rules),
  latex: (input) => latexTable(input),
  json: (input) => JSON.stringify(provenanceJson(input), null, 2) + '\n',
  methods: (input) => methodsParagraph(input),
  bibtex: (input) => bibtex(input.request),
};
