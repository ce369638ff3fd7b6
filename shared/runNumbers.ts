import { z } from 'zod';
import { formatEntropy, formatQuantity, formatSignificantDigits } from './precision';
import { regionLatex, regionSettingsText, regionSpecSchema, type RegionSpec } from './regions';
import type { RunDetail, RunResult } from './runs';
import {
  effectiveRestrictedCut,
  entropyRuleLabel,
  renyiLabel,
  restrictedCutSchema,
  restrictedCutText,
  sortedRenyiOrders,
  subregionSpecSchema,
  truncationRuleSchema,
  truncationRuleText,
  type RenyiOrder,
  type RestrictedCut,
  type SubregionSpec,
  type TruncationRule,
} from './vacuum';

/**
 * A run's settings and numbers read from its detail, for the places that put several runs or one run's
 * numbers side by side outside the run page: the compare page's tables and downloads, `run.json` and
 * the copy-ready LaTeX. Pure, so the server's exports and the client compute the same text.
 */

/** The parts of a stored request these readers use; a run stores its validated request, so each part is read leniently. */
const storedRequestSchema = z.looseObject({
  mass: z.number().optional().catch(undefined),
  truncation: truncationRuleSchema.optional().catch(undefined),
  doubleTruncation: z.boolean().optional().catch(undefined),
  restrictedCut: restrictedCutSchema.optional().catch(undefined),
  subregion: subregionSpecSchema.optional().catch(undefined),
  engine: z.enum(['auto', 'dense', 'structured']).optional().catch(undefined),
  sprinkling: z
    .looseObject({
      region: regionSpecSchema.optional().catch(undefined),
      seed: z.union([z.string(), z.number()]).transform(String).optional().catch(undefined),
      prng: z.string().optional().catch(undefined),
      process: z.string().optional().catch(undefined),
      count: z.number().optional().catch(undefined),
      density: z.number().optional().catch(undefined),
    })
    .optional()
    .catch(undefined),
  causalSet: z
    .looseObject({ id: z.string(), name: z.string(), region: regionSpecSchema.nullable().optional().catch(null) })
    .optional()
    .catch(undefined),
  reusedPoints: z.looseObject({ runId: z.string() }).optional().catch(undefined),
});

/** The settings of a run that decide its numbers, in one flat shape. */
export interface RunSettings {
  mass: number;
  truncation: TruncationRule;
  doubleTruncation: boolean;
  /** the restricted cut that applies; null without double truncation */
  restrictedCut: RestrictedCut | null;
  subregion: SubregionSpec | null;
  /** the engine the run asked for */
  engineRequest: 'auto' | 'dense' | 'structured';
  region: RegionSpec | null;
  /** null for a run on an imported causal set */
  seed: string | null;
  prng: string | null;
  process: string | null;
  causalSet: { id: string; name: string } | null;
  /** the run whose points a re-analysis reused */
  reusedPointsOf: string | null;
}

export function runSettingsOf(request: unknown): RunSettings {
  const parsed = storedRequestSchema.safeParse(request ?? {});
  const r = parsed.success ? parsed.data : {};
  const truncation: TruncationRule = r.truncation ?? { rule: 'none' };
  const doubleTruncation = r.doubleTruncation ?? false;
  return {
    mass: r.mass ?? 0,
    truncation,
    doubleTruncation,
    restrictedCut: effectiveRestrictedCut({ truncation, doubleTruncation, restrictedCut: r.restrictedCut }),
    subregion: r.subregion ?? null,
    engineRequest: r.engine ?? 'auto',
    region: r.sprinkling?.region ?? r.causalSet?.region ?? null,
    seed: r.sprinkling?.seed ?? null,
    prng: r.sprinkling?.prng ?? null,
    process: r.sprinkling?.process ?? null,
    causalSet: r.causalSet ? { id: r.causalSet.id, name: r.causalSet.name } : null,
    reusedPointsOf: r.reusedPoints?.runId ?? null,
  };
}

/** A subregion in words: "diamond from (t, x) to (t, x)" or "12 listed elements". */
export function subregionText(spec: SubregionSpec | null): string {
  if (!spec) return 'none';
  if (spec.kind === 'elements') return `${spec.indices.length} listed elements`;
  const tip = (e: Record<string, number>) => `(${Object.values(e).join(', ')})`;
  return `diamond from ${tip(spec.past)} to ${tip(spec.future)}`;
}

/** Where a run's elements came from, in words: the region, or the imported set by name. */
export function runRegionText(settings: RunSettings): string {
  if (settings.causalSet) return `imported set ${settings.causalSet.name}${settings.region ? ` (${regionSettingsText(settings.region)})` : ''}`;
  return settings.region ? regionSettingsText(settings.region) : 'unknown';
}

/** The engine that ran (or, before a result, the one asked for). */
export function runEngineText(result: Pick<RunResult, 'engine'> | null, settings: RunSettings): string {
  if (result?.engine) return result.engine;
  return result ? 'dense' : settings.engineRequest;
}

/** S_α of a result's subregion by order, ascending, ∞ last (the von Neumann S is not among them). */
export function renyiEntries(entropy: Pick<NonNullable<RunResult['entropy']>, 'renyi'> | null | undefined): { key: string; order: RenyiOrder; value: number }[] {
  const renyi = entropy?.renyi ?? {};
  const orders = sortedRenyiOrders(Object.keys(renyi).map((k): RenyiOrder => (k === 'inf' ? 'inf' : Number(k))));
  return orders.map((order) => {
    const key = order === 'inf' ? 'inf' : String(order);
    return { key, order, value: renyi[key]! };
  });
}

// ---- LaTeX ----

/** Text for a LaTeX text-mode cell: the special characters escaped and the symbols of the rule texts in math mode. */
function latexText(text: string): string {
  return text
    .replace(/[\\{}&%$#_~^]/g, (c) => (c === '\\' ? '\\textbackslash{}' : c === '~' ? '\\textasciitilde{}' : c === '^' ? '\\textasciicircum{}' : `\\${c}`))
    .replace(/√(\w+)/g, '$\\sqrt{$1}$')
    .replace(/π/g, '$\\pi$')
    .replace(/λ/g, '$\\lambda$')
    .replace(/ℓ/g, '$\\ell$')
    .replace(/–/g, '--');
}

/** The whole-region rule as LaTeX: "untruncated", "$\sqrt{N}/(4\pi)$", "$\lambda_c = 0.5$", "$48$ top modes", "knee". */
export function truncationRuleLatex(rule: TruncationRule): string {
  switch (rule.rule) {
    case 'none':
      return 'untruncated';
    case 'sqrtN':
      return '$\\sqrt{N}/(4\\pi)$';
    case 'lambda':
      return `$\\lambda_c = ${rule.cut}$`;
    case 'modes':
      return `$${rule.count}$ top modes`;
    case 'knee':
      return rule.tolerance === undefined ? 'knee' : `knee (tolerance $${rule.tolerance}$)`;
  }
}

/** The restricted cut as LaTeX: "$\sqrt{n}/(4\pi)$" or "$\lambda = 0.2$". */
export function restrictedCutLatex(cut: RestrictedCut): string {
  return cut.rule === 'sqrtN' ? '$\\sqrt{n}/(4\\pi)$' : `$\\lambda = ${cut.cut}$`;
}

const math = (text: string) => `$${text}$`;

/** The Rényi order's symbol: S_{2}, S_{1/2} for 0.5, S_\infty. */
function renyiSymbolLatex(order: RenyiOrder): string {
  if (order === 'inf') return 'S_{\\infty}';
  return `S_{${order === 0.5 ? '1/2' : String(order)}}`;
}

/**
 * A run's numbers as a small booktabs table to paste into a paper (needs \usepackage{booktabs} and
 * amsmath for \text): N, ρ, the rule and its cut λ_c, the modes kept, and with a subregion its n, the
 * restricted cut, S, the Rényi S_α, the pair's I(A:B) and the complement's S_O′. Every number follows
 * shared/precision.ts: a cut to four significant digits, an entropy to four or as the floor text of a
 * pure state, counts exact. A single run has no error bar, so no ± appears.
 */
export function runNumbersLatex(run: Pick<RunDetail, 'id' | 'title' | 'request' | 'result' | 'dimension'>): string {
  const result = run.result;
  if (!result) throw new Error(`Run ${run.id} has no result yet; its numbers exist once it is done.`);
  const settings = runSettingsOf(run.request);
  const rows: [string, string][] = [];
  rows.push([math('N'), math(formatQuantity(result.N, 'count', 'latex'))]);
  // ρ without an error: four significant digits, as a spectral value
  if (result.density !== null) rows.push([math('\\rho'), math(formatQuantity(result.density, 'spectral', 'latex'))]);
  if (settings.mass !== 0) rows.push([math('m'), math(formatSignificantDigits(settings.mass, 4, 'latex'))]);
  rows.push(['cut rule', truncationRuleLatex(settings.truncation)]);
  if (result.cutoff > 0) rows.push([math('\\lambda_c'), math(formatQuantity(result.cutoff, 'cut', 'latex'))]);
  rows.push(['modes kept', math(formatQuantity(result.modesKept, 'count', 'latex'))]);
  const entropy = result.entropy;
  if (entropy) {
    rows.push([math('n'), math(formatQuantity(entropy.n, 'count', 'latex'))]);
    if (settings.restrictedCut) {
      rows.push(['restricted cut', restrictedCutLatex(settings.restrictedCut)]);
      if (entropy.cutoff !== undefined) rows.push([math('\\lambda_c^{O}'), math(formatQuantity(entropy.cutoff, 'cut', 'latex'))]);
    }
    rows.push([math('S'), math(formatEntropy(entropy.S, 'latex'))]);
    for (const { order, value } of renyiEntries(entropy)) rows.push([math(renyiSymbolLatex(order)), math(formatEntropy(value, 'latex'))]);
  }
  const pair = result.mutualInformation;
  if (pair) {
    rows.push([math('n_A,\\ n_B'), math(`${pair.a.n},\\ ${pair.b.n}`)]);
    rows.push([math('S_A'), math(formatEntropy(pair.a.S, 'latex'))]);
    rows.push([math('S_B'), math(formatEntropy(pair.b.S, 'latex'))]);
    rows.push([math('S_{A \\cup B}'), math(formatEntropy(pair.union.S, 'latex'))]);
    rows.push([math('I(A{:}B)'), math(formatEntropy(pair.I, 'latex'))]);
  }
  const complement = result.complement;
  if (complement && entropy) {
    rows.push([math("n_{O'}"), math(formatQuantity(complement.n, 'count', 'latex'))]);
    rows.push([math("S_{O'}"), math(formatEntropy(complement.S, 'latex'))]);
  }

  const region = settings.region ? regionLatex(settings.region) : settings.causalSet ? `imported set ${latexText(settings.causalSet.name)}` : 'a causal set';
  const captionParts = [
    run.title ? `${latexText(run.title)}. ` : '',
    `Vacuum run on ${region}`,
    settings.seed !== null ? `, seed \\texttt{${latexText(settings.seed)}}` : '',
    entropy ? `; entropy rule: ${latexText(entropyRuleLabel(settings))}` : '',
    '.',
  ];
  const lines = [
    `% Tacet vacuum run ${run.id}${run.title ? ` (${run.title.replace(/[\r\n]+/g, ' ')})` : ''}`,
    '% Needs \\usepackage{booktabs} and \\usepackage{amsmath} in the preamble.',
    '\\begin{table}[htbp]',
    '  \\centering',
    `  \\caption{${captionParts.join('')}}`,
    `  \\label{tab:tacet-run-${run.id.slice(0, 8)}}`,
    '  \\begin{tabular}{ll}',
    '    \\toprule',
    '    quantity & value \\\\',
    '    \\midrule',
    ...rows.map(([label, value]) => `    ${label} & ${value} \\\\`),
    '    \\bottomrule',
    '  \\end{tabular}',
    '\\end{table}',
  ];
  return lines.join('\n') + '\n';
}

/** The rule of a run in words, as the run page names it (kept beside the LaTeX form for the compare tables). */
export function runRuleText(settings: RunSettings): string {
  return truncationRuleText(settings.truncation);
}

