import { formatQuantity, formatWithError } from '@shared/precision';
import type { StudyAggregate, StudyFit, StudySpectrum } from '@shared/studies';
import { fitQuantity, renyiQuantity } from '@shared/studies';
import { renyiLabel } from '@shared/vacuum';
import { plotPalette } from '../../../lib/plotTheme';

/** Marker symbols per subregion, so the series stay apart in print without colour. */
const symbols = ['circle', 'square', 'diamond', 'triangle-up', 'triangle-down', 'cross', 'x', 'star', 'hexagon', 'pentagon', 'circle-open', 'square-open'];
const inks = [plotPalette.data, plotPalette.dataSoft];

export interface SeriesOptions {
  aggregates: StudyAggregate[];
  fits: StudyFit[];
  rule: string;
  subregionLabels: Record<string, string>;
  model: 'log' | 'linear';
  /** "S" (the default) or the renyiKey of an S_α ("2", "inf") */
  quantity?: string;
}

/** Mean ± SE of S or of one S_α in an aggregate row (undefined where the row has no such S_α). */
function quantityOf(a: StudyAggregate, quantity: string): { mean: number; se: number | null } | undefined {
  return quantity === 'S' ? { mean: a.meanS, se: a.seS } : a.renyi?.[quantity];
}

/**
 * Ensemble means of one rule, one series per subregion, with standard-error bars, plus the fitted
 * lines as dashed accent lines: one per subregion across N, or one through all points when there is
 * a single subregion.
 */
export function scalingTraces({ aggregates, fits, rule, subregionLabels, model, quantity = 'S' }: SeriesOptions): Record<string, unknown>[] {
  // pairs have their own plot (pairDecayTraces): their S is that of A∪B
  const rows = aggregates.filter((a) => a.rule === rule && !a.pair && quantityOf(a, quantity) !== undefined);
  const fitKey = quantity === 'S' ? 'S' : renyiQuantity(quantity);
  const symbol = quantity === 'S' ? 'S' : renyiLabel(quantity);
  const subregions = [...new Set(rows.map((r) => r.subregion))];
  const x = (a: StudyAggregate) => (model === 'log' ? 0.5 * Math.log(a.meanN) : a.meanN);
  const traces: Record<string, unknown>[] = subregions.map((s, k) => {
    const points = rows.filter((r) => r.subregion === s);
    return {
      type: 'scatter',
      mode: 'markers',
      name: subregionLabels[s] ?? s,
      x: points.map(x),
      y: points.map((p) => quantityOf(p, quantity)!.mean),
      error_y: { type: 'data', array: points.map((p) => quantityOf(p, quantity)!.se ?? 0), visible: true, color: inks[k % 2], thickness: 1, width: 3 },
      marker: { color: inks[k % 2], symbol: symbols[k % symbols.length], size: 7 },
      hovertemplate: `N = %{customdata}<br>${model === 'log' ? 'ln √n' : 'n'} = %{x:.4g}<br>${symbol} = %{y:.4g}<extra>${subregionLabels[s] ?? s}</extra>`,
      customdata: points.map((p) => p.N),
    };
  });
  // With several subregions the line per subregion (across N, at fixed ℓ/T) is the ultraviolet
  // scaling; one line through every point would mix in how S depends on ℓ/T.
  const lines = subregions.length > 1 ? subregions.map((sub) => ({ sub, points: rows.filter((r) => r.subregion === sub) })) : [{ sub: null, points: rows }];
  const slopeName = model === 'log' ? 'b' : 'a';
  lines.forEach(({ sub, points }, k) => {
    const fit = fits.find((f) => f.rule === rule && f.model === model && f.subregion === sub && fitQuantity(f) === fitKey);
    if (!fit || points.length < 2) return;
    const xs = points.map(x);
    const lo = Math.min(...xs);
    const hi = Math.max(...xs);
    const pad = 0.04 * (hi - lo || 1);
    const ends = [lo - pad, hi + pad];
    const where = sub === null ? '' : ` (${subregionLabels[sub] ?? sub})`;
    traces.push({
      type: 'scatter',
      mode: 'lines',
      name: `fit${where}: ${slopeName} = ${formatWithError(fit.slope, fit.slopeError, 'text', 'fit')}`,
      x: ends,
      y: ends.map((v) => fit.slope * v + fit.intercept),
      line: { color: plotPalette.cut, width: 1.5, dash: ['dash', 'dot', 'dashdot', 'longdash'][k % 4] },
      hoverinfo: 'skip',
    });
  });
  return traces;
}

/** The continuum slope b = 1/3 through the centre of the data, as a reference line (Calabrese–Cardy 2004). */
export function referenceSlopeTrace(aggregates: StudyAggregate[], rule: string): Record<string, unknown> | null {
  const rows = aggregates.filter((a) => a.rule === rule && !a.pair);
  if (rows.length < 2) return null;
  const xs = rows.map((a) => 0.5 * Math.log(a.meanN));
  const meanX = xs.reduce((s, v) => s + v, 0) / xs.length;
  const meanY = rows.reduce((s, a) => s + a.meanS, 0) / rows.length;
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  return {
    type: 'scatter',
    mode: 'lines',
    name: 'slope 1/3 (continuum)',
    x: [lo, hi],
    y: [lo, hi].map((v) => meanY + (v - meanX) / 3),
    line: { color: plotPalette.reference, width: 1.5 },
    hoverinfo: 'skip',
  };
}

/**
 * Positive eigenvalues by rank of one sprinkling per N (log–log), with each rule's cut as a dashed
 * line. `setNames` maps a cell seed that is an imported causal set's id to the set's name.
 */
export function spectraTraces(
  spectra: StudySpectrum[],
  setNames: ReadonlyMap<string, string> = new Map(),
  ruleLabels: Readonly<Record<string, string>> = {},
): Record<string, unknown>[] {
  // N told apart by colour and marker as well as dash, so a grey-scale print or a colour-blind reader still can
  const tones = [plotPalette.data, plotPalette.cut, plotPalette.dataSoft, plotPalette.accentDeep, plotPalette.reference, plotPalette.inkFaint];
  const symbols = ['circle', 'square', 'triangle-up', 'diamond', 'cross', 'x'];
  const traces: Record<string, unknown>[] = spectra.map((s, k) => ({
    type: 'scatter',
    mode: 'lines+markers',
    name: setNames.has(s.seed) ? `N = ${s.N} (${setNames.get(s.seed)})` : `N = ${s.N} (seed ${s.seed})`,
    x: s.eigenvalues.map((_, r) => r + 1),
    y: s.eigenvalues,
    line: { color: tones[k % tones.length], width: 1.2, dash: ['solid', 'dot', 'dashdot', 'longdash'][k % 4] },
    marker: { color: tones[k % tones.length], symbol: symbols[k % symbols.length], size: 5, maxdisplayed: 12 },
  }));
  for (const s of spectra) {
    for (const cut of s.cuts) {
      traces.push({
        type: 'scatter',
        mode: 'lines',
        name: `cut: ${ruleLabels[cut.rule] ?? cut.rule}`,
        x: [1, s.eigenvalues.length],
        y: [cut.cutoff, cut.cutoff],
        line: { color: plotPalette.cut, width: 1, dash: 'dash' },
        showlegend: s === spectra[0],
        legendgroup: `cut ${cut.rule}`,
        hovertemplate: `${ruleLabels[cut.rule] ?? cut.rule}, N = ${s.N}: λc = ${formatQuantity(cut.cutoff, 'cut')}<extra></extra>`,
      });
    }
  }
  return traces;
}

/** The pair-study series: one per (ℓ/T, N) of a rule, separations ascending. */
export function pairSeries(aggregates: StudyAggregate[], rule: string): { size: number; N: number; rows: StudyAggregate[] }[] {
  const series = new Map<string, { size: number; N: number; rows: StudyAggregate[] }>();
  for (const a of aggregates) {
    if (a.rule !== rule || !a.pair) continue;
    const key = `${a.pair.size}|${a.N}`;
    const entry = series.get(key) ?? { size: a.pair.size, N: a.N, rows: [] };
    entry.rows.push(a);
    series.set(key, entry);
  }
  return [...series.values()]
    .sort((p, q) => p.size - q.size || p.N - q.N)
    .map((s) => ({ ...s, rows: s.rows.sort((p, q) => p.pair!.separation - q.pair!.separation) }));
}

/** The log-log fit of one (rule, ℓ/T, N), if the study has one. */
export const pairFitOf = (fits: StudyFit[], rule: string, size: number, N: number): StudyFit | undefined =>
  fits.find((f) => f.model === 'loglog' && f.rule === rule && f.size === size && f.N === N);

/**
 * ⟨I⟩ ± SE against d/T on log-log axes, one series per (ℓ/T, N) of the rule (⟨I⟩ ≤ 0 cannot be drawn
 * there and is left out; the fit leaves it out too), each fit ⟨I⟩ = e^q (d/T)^p as a dashed accent line
 * over the fitted range, and the continuum trend as a `reference` line of the continuum's log-log slope
 * (stored with the fit) through the middle of the fitted line: a comparison of slopes, not of values.
 */
export function pairDecayTraces(aggregates: StudyAggregate[], fits: StudyFit[], rule: string): Record<string, unknown>[] {
  const traces: Record<string, unknown>[] = [];
  pairSeries(aggregates, rule).forEach(({ size, N, rows }, k) => {
    const drawn = rows.filter((r) => r.pair!.meanI > 0);
    const name = `ℓ/T = ${size}, N = ${N}`;
    traces.push({
      type: 'scatter',
      mode: 'markers',
      name,
      x: drawn.map((r) => r.pair!.separation),
      y: drawn.map((r) => r.pair!.meanI),
      error_y: { type: 'data', array: drawn.map((r) => r.pair!.seI ?? 0), visible: true, color: inks[k % 2], thickness: 1, width: 3 },
      marker: { color: inks[k % 2], symbol: symbols[k % symbols.length], size: 7 },
      hovertemplate: `d/T = %{x:.4g}<br>⟨I⟩ = %{y:.4g}<extra>${name}</extra>`,
    });
    const fit = pairFitOf(fits, rule, size, N);
    if (!fit?.continuum) return;
    const { from, to } = fit.continuum;
    const ends = [from, to];
    traces.push({
      type: 'scatter',
      mode: 'lines',
      name: `fit (${name}): slope ${formatWithError(fit.slope, fit.slopeError, 'text', 'fit')}`,
      x: ends,
      y: ends.map((d) => Math.exp(fit.intercept) * d ** fit.slope),
      line: { color: plotPalette.cut, width: 1.5, dash: ['dash', 'dot', 'dashdot', 'longdash'][k % 4] },
      hoverinfo: 'skip',
    });
    const middle = Math.sqrt(from * to);
    const atMiddle = Math.exp(fit.intercept) * middle ** fit.slope;
    traces.push({
      type: 'scatter',
      mode: 'lines',
      name: `continuum trend (${name}): slope ${formatQuantity(fit.continuum.slope, 'fit')}`,
      x: ends,
      y: ends.map((d) => atMiddle * (d / middle) ** fit.continuum!.slope),
      line: { color: plotPalette.reference, width: 1.5, dash: ['solid', 'dot', 'dashdot', 'longdash'][k % 4] },
      hoverinfo: 'skip',
    });
  });
  return traces;
}
