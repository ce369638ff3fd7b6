import type { StudyAggregate, StudyEntropy, StudyRule } from '@shared/studies';
import { studyRuleKey } from '@shared/studies';
import { effectiveRestrictedCut, formatRestrictedCut, formatTruncationRule } from '@shared/vacuum';

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

/** The column name of S_α: "S_alpha_2", "S_alpha_0.5", "S_alpha_inf". */
const renyiColumn = (prefix: string, key: string) => `${prefix}_alpha_${key}`;

const optional = (v: number | null | undefined) => (v === undefined || v === null ? '' : full(v));

/**
 * Tidy CSV: one row per computed entropy (one sprinkling, subregion and rule). With Rényi orders
 * (`renyiKeys`, shared/studies.ts studyRenyiKeys) a column S_alpha_<α> each; with pairs the pair's
 * l_over_L, d_over_L, S_A, S_B, S_AB, I, n_A, n_B (n and S are then those of A∪B) and I_alpha_<α>.
 */
export function tidyCsv(entropies: StudyEntropy[], rules: StudyRule[], renyiKeys: string[] = []): string {
  const columns = ruleColumns(rules);
  const pairs = entropies.some((e) => e.pair);
  return csv(
    [
      'cell', 'N', 'elements', 'seed', 'subregion', 'l_over_L', 'rule', 'state_rule', 'restricted_cut', 'n', 'S', 'modes_kept', 'cutoff', 'state_modes_kept', 'state_cutoff',
      ...renyiKeys.map((k) => renyiColumn('S', k)),
      ...(pairs ? ['pair_l_over_L', 'd_over_L', 'S_A', 'S_B', 'S_AB', 'I', 'n_A', 'n_B', ...renyiKeys.map((k) => renyiColumn('I', k))] : []),
    ],
    entropies.map((e) => [
      e.cellId, e.N, e.elements, e.seed, e.subregion, e.fraction === null ? '' : String(e.fraction), e.rule, ...columns(e.rule), e.n, full(e.S),
      e.modesKept, full(e.cutoff), e.stateModesKept, full(e.stateCutoff),
      ...renyiKeys.map((k) => optional(e.renyi?.[k])),
      ...(pairs
        ? e.pair
          ? [String(e.pair.size), String(e.pair.separation), full(e.pair.SA), full(e.pair.SB), full(e.pair.SAB), full(e.pair.I), e.pair.nA, e.pair.nB, ...renyiKeys.map((k) => optional(e.pair!.renyiI?.[k]))]
          : Array.from({ length: 8 + renyiKeys.length }, () => '')
        : []),
    ]),
  );
}

/** The aggregate table: one row per (N, subregion, rule), with mean ± SE of each S_α and, for pairs, of I. */
export function aggregatesCsv(aggregates: StudyAggregate[], rules: StudyRule[], renyiKeys: string[] = []): string {
  const columns = ruleColumns(rules);
  const pairs = aggregates.some((a) => a.pair);
  return csv(
    [
      'N', 'subregion', 'l_over_L', 'rule', 'state_rule', 'restricted_cut', 'seeds', 'mean_elements', 'mean_n', 'mean_S', 'sd_S', 'se_S',
      ...renyiKeys.flatMap((k) => [renyiColumn('mean_S', k), renyiColumn('se_S', k)]),
      ...(pairs ? ['pair_l_over_L', 'd_over_L', 'mean_I', 'sd_I', 'se_I', ...renyiKeys.flatMap((k) => [renyiColumn('mean_I', k), renyiColumn('se_I', k)])] : []),
    ],
    aggregates.map((a) => [
      a.N, a.subregion, a.fraction === null ? '' : String(a.fraction), a.rule, ...columns(a.rule), a.seeds, full(a.meanElements), full(a.meanN), full(a.meanS), full(a.sdS), full(a.seS),
      ...renyiKeys.flatMap((k) => [optional(a.renyi?.[k]?.mean), optional(a.renyi?.[k]?.se)]),
      ...(pairs
        ? a.pair
          ? [String(a.pair.size), String(a.pair.separation), full(a.pair.meanI), optional(a.pair.sdI), optional(a.pair.seI), ...renyiKeys.flatMap((k) => [optional(a.pair!.renyiI?.[k]?.mean), optional(a.pair!.renyiI?.[k]?.se)])]
          : Array.from({ length: 5 + 2 * renyiKeys.length }, () => '')
        : []),
    ]),
  );
}
