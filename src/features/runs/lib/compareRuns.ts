import { formatEntropy } from '@shared/precision';
import type { RunDetail } from '@shared/runs';
import { renyiEntries, runEngineText, runRegionText, runSettingsOf, subregionText } from '@shared/runNumbers';
import { renyiLabel, restrictedCutText, truncationRuleText } from '@shared/vacuum';
import { maxCompared, runLabel } from './runIds';

/**
 * What the compare page puts side by side, kept apart from the components so it can be tested: the
 * selection in the URL, the settings that differ, each run's entropies, and the downloads built from
 * the very rows the page shows.
 */

/**
 * The runs of `?ids=a,b` (the runs list's Compare link) or `?runs=a,b`: trimmed, without repeats, at
 * most `maxCompared`, in the order given.
 */
export function compareSelection(params: URLSearchParams): string[] {
  const text = params.get('ids') ?? params.get('runs');
  if (!text) return [];
  return Array.from(new Set(text.split(',').map((id) => id.trim()).filter(Boolean))).slice(0, maxCompared);
}

/** The search part of the compare page's URL for a selection (commas kept readable). */
export function compareSearch(ids: string[]): string {
  return `?ids=${ids.map(encodeURIComponent).join(',')}`;
}

/** Each run's label, with its short id added where two runs would read alike. */
export function distinctLabels(runs: Pick<RunDetail, 'id' | 'title'>[]): string[] {
  const labels = runs.map(runLabel);
  return labels.map((label, k) => (labels.filter((l) => l === label).length > 1 ? `${label} (${runs[k]!.id.slice(0, 8)})` : label));
}

export interface SettingRow {
  key: 'rule' | 'restrictedCut' | 'seed' | 'mass' | 'engine' | 'N' | 'region' | 'subregion';
  label: string;
  /** one text per run, in the selection's order */
  values: string[];
}

/** The settings that decide a run's numbers, one row each, a text per run. */
export function settingRows(runs: RunDetail[]): SettingRow[] {
  const settings = runs.map((run) => runSettingsOf(run.request));
  const row = (key: SettingRow['key'], label: string, value: (run: RunDetail, k: number) => string): SettingRow => ({ key, label, values: runs.map(value) });
  return [
    row('rule', 'Cut rule', (_, k) => truncationRuleText(settings[k]!.truncation)),
    row('restrictedCut', 'Restricted cut', (_, k) => (settings[k]!.restrictedCut ? restrictedCutText(settings[k]!.restrictedCut!) : 'none')),
    row('seed', 'Seed', (_, k) => settings[k]!.seed ?? (settings[k]!.causalSet ? 'imported set' : '—')),
    row('mass', 'Mass m', (_, k) => String(settings[k]!.mass)),
    row('engine', 'Engine', (run, k) => runEngineText(run.result, settings[k]!)),
    row('N', 'N', (run) => String(run.result?.N ?? run.N ?? '—')),
    row('region', 'Region', (_, k) => runRegionText(settings[k]!)),
    row('subregion', 'Subregion', (_, k) => subregionText(settings[k]!.subregion)),
  ];
}

/** Only the settings in which the runs differ; empty when they all agree. */
export function differingSettings(runs: RunDetail[]): SettingRow[] {
  return settingRows(runs).filter((row) => new Set(row.values).size > 1);
}

/** One run's entropies as the compare page shows them; null where the run did not ask for the part. */
export interface EntropyCompareRow {
  id: string;
  label: string;
  N: number | null;
  rule: string;
  subregion: string;
  n: number | null;
  S: number | null;
  /** S_α by renyiKey ("0.5", "2", "inf") */
  renyi: Record<string, number>;
  I: number | null;
  SA: number | null;
  SB: number | null;
  SAB: number | null;
  SOprime: number | null;
}

export function entropyRows(runs: RunDetail[]): EntropyCompareRow[] {
  const labels = distinctLabels(runs);
  return runs.map((run, k) => {
    const settings = runSettingsOf(run.request);
    const result = run.result;
    const entropy = result?.entropy ?? null;
    const pair = result?.mutualInformation ?? null;
    return {
      id: run.id,
      label: labels[k]!,
      N: result?.N ?? run.N,
      rule: truncationRuleText(settings.truncation) + (settings.restrictedCut ? `, restricted ${restrictedCutText(settings.restrictedCut)}` : ''),
      subregion: subregionText(settings.subregion),
      n: entropy?.n ?? null,
      S: entropy?.S ?? null,
      renyi: Object.fromEntries(renyiEntries(entropy).map((e) => [e.key, e.value])),
      I: pair?.I ?? null,
      SA: pair?.a.S ?? null,
      SB: pair?.b.S ?? null,
      SAB: pair?.union.S ?? null,
      SOprime: result?.complement && entropy ? result.complement.S : null,
    };
  });
}

/** The Rényi orders any compared run has, ascending, ∞ last. */
export function renyiKeysOf(rows: EntropyCompareRow[]): string[] {
  return renyiEntries({ renyi: Object.fromEntries(rows.flatMap((r) => Object.keys(r.renyi)).map((k) => [k, 0])) }).map((e) => e.key);
}

/** An entropy cell: the precision rule's text, "—" where the run has none. */
export function entropyCell(value: number | null | undefined): string {
  return value === null || value === undefined ? '—' : formatEntropy(value);
}

/** 17 significant digits, as points.csv: enough for a double to read back as itself. */
const fullPrecision = (value: number | null | undefined) => (value === null || value === undefined ? '' : value.toPrecision(17));

/** A CSV field: quoted when it holds a comma, a quote or a line break (RFC 4180). */
const csvField = (text: string) => (/[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text);

const settingColumns: Record<SettingRow['key'], string> = {
  rule: 'cut_rule',
  restrictedCut: 'restricted_cut',
  seed: 'seed',
  mass: 'mass',
  engine: 'engine',
  N: 'N',
  region: 'region',
  subregion: 'subregion',
};

/**
 * The compared runs as CSV, one row per run: its id and label, every setting of the settings table,
 * then n, S, each S_α, I(A:B) with S_A, S_B, S_{A∪B}, and S_O′, at 17 significant digits.
 */
export function compareCsv(runs: RunDetail[]): string {
  const settings = settingRows(runs);
  const rows = entropyRows(runs);
  const orders = renyiKeysOf(rows);
  const header = ['run_id', 'label', ...settings.map((s) => settingColumns[s.key]), 'n', 'S', ...orders.map((k) => `S_alpha_${k}`), 'I', 'S_A', 'S_B', 'S_AB', 'S_Oprime'];
  const lines = rows.map((row, k) =>
    [
      row.id,
      csvField(row.label),
      ...settings.map((s) => csvField(s.values[k]!)),
      row.n === null ? '' : String(row.n),
      fullPrecision(row.S),
      ...orders.map((o) => fullPrecision(row.renyi[o])),
      fullPrecision(row.I),
      fullPrecision(row.SA),
      fullPrecision(row.SB),
      fullPrecision(row.SAB),
      fullPrecision(row.SOprime),
    ].join(','),
  );
  return [header.join(','), ...lines].join('\n') + '\n';
}

/** The compared runs as JSON: the settings table (with which rows differ), the entropy rows and each run's spectrum and cut. */
export function compareJson(runs: RunDetail[], exportedAt: Date = new Date()): string {
  const settings = settingRows(runs);
  return JSON.stringify(
    {
      format: 'tacet-compare/1',
      exportedAt: exportedAt.toISOString(),
      runs: runs.map((r) => r.id),
      settings: settings.map((s) => ({ ...s, differs: new Set(s.values).size > 1 })),
      entropies: entropyRows(runs),
      spectra: runs.map((r) => ({
        id: r.id,
        N: r.result?.N ?? null,
        eigenvalues: r.result?.eigenvalues ?? null,
        cutoff: r.result?.cutoff ?? null,
        modesKept: r.result?.modesKept ?? null,
      })),
    },
    null,
    2,
  ) + '\n';
}

/** The downloads' file name stem: `tacet-compare-` and the first four characters of each run's id. */
export function compareFileStem(runs: Pick<RunDetail, 'id'>[]): string {
  return `tacet-compare-${runs.map((r) => r.id.slice(0, 4)).join('-')}`;
}

type Trace = Record<string, unknown> & { name: string; x: string[]; y: number[] };

/**
 * The entropies by run: S in ink (a larger point), each S_α in its own marker in the soft ink, I(A:B) as
 * accent diamonds and S_O′ as open circles in the reference colour; a run without a part has no point
 * for it.
 */
export function entropyCompareTraces(rows: EntropyCompareRow[], colors: { data: string; dataSoft: string; cut: string; reference: string }): Trace[] {
  const series = (name: string, value: (r: EntropyCompareRow) => number | null | undefined, marker: Record<string, unknown>): Trace | null => {
    const shown = rows.filter((r) => value(r) !== null && value(r) !== undefined);
    if (shown.length === 0) return null;
    return {
      name,
      type: 'scatter',
      mode: 'markers',
      x: shown.map((r) => r.label),
      y: shown.map((r) => value(r)!),
      marker,
      customdata: shown.map((r) => `${entropyCell(value(r))}${r.n !== null ? `, n = ${r.n}` : ''}`),
      hovertemplate: `%{x}<br>${name} = %{customdata}<extra></extra>`,
    };
  };
  const symbols = ['triangle-up', 'square', 'triangle-down', 'cross', 'x', 'star', 'hexagon', 'pentagon'];
  const traces = [
    series('S', (r) => r.S, { color: colors.data, size: 10, symbol: 'circle' }),
    ...renyiKeysOf(rows).map((key, k) => series(renyiLabel(key), (r) => r.renyi[key], { color: colors.dataSoft, size: 8, symbol: symbols[k % symbols.length] })),
    series('I(A:B)', (r) => r.I, { color: colors.cut, size: 9, symbol: 'diamond' }),
    series('S_O′ (complement)', (r) => r.SOprime, { color: colors.reference, size: 9, symbol: 'circle-open' }),
  ];
  return traces.filter((t): t is Trace => t !== null);
}
