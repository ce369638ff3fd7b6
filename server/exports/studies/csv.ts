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
