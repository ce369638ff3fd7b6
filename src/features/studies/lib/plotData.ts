import type { StudyAggregate, StudyFit, StudySpectrum } from '@shared/studies';
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
}

/**
 * Ensemble means of one rule, one series per subregion, with standard-error bars, plus the fitted
 * lines as dashed accent lines: one per subregion across N, or one through all points when there is
 * a single subregion.
 */
export function scalingTraces({ aggregates, fits, rule, subregionLabels, model }: SeriesOptions): Record<string, unknown>[] {
  const rows = aggregates.filter((a) => a.rule === rule);
  const subregions = [...new Set(rows.map((r) => r.subregion))];
  const x = (a: StudyAggregate) => (model === 'log' ? 0.5 * Math.log(a.meanN) : a.meanN);
  const traces: Record<string, unknown>[] = subregions.map((s, k) => {
    const points = rows.filter((r) => r.subregion === s);
    return {
      type: 'scatter',
      mode: 'markers',
      name: subregionLabels[s] ?? s,
      x: points.map(x),
      y: points.map((p) => p.meanS),
      error_y: { type: 'data', array: points.map((p) => p.seS ?? 0), visible: true, color: inks[k % 2], thickness: 1, width: 3 },
      marker: { color: inks[k % 2], symbol: symbols[k % symbols.length], size: 7 },
      hovertemplate: `N = %{customdata}<br>${model === 'log' ? 'ln √n' : 'n'} = %{x:.4g}<br>S = %{y:.4g}<extra>${subregionLabels[s] ?? s}</extra>`,
      customdata: points.map((p) => p.N),
    };
  });
  // With several subregions the line per subregion (across N, at fixed ℓ/L) is the ultraviolet
  // scaling; one line through every point would mix in how S depends on ℓ/L.
  const lines = subregions.length > 1 ? subregions.map((sub) => ({ sub, points: rows.filter((r) => r.subregion === sub) })) : [{ sub: null, points: rows }];
  const slopeName = model === 'log' ? 'b' : 'a';
  lines.forEach(({ sub, points }, k) => {
    const fit = fits.find((f) => f.rule === rule && f.model === model && f.subregion === sub);
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
      name: `fit${where}: ${slopeName} = ${fit.slope.toPrecision(3)}${fit.slopeError !== null ? ` ± ${fit.slopeError.toPrecision(2)}` : ''}`,
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
  const rows = aggregates.filter((a) => a.rule === rule);
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
export function spectraTraces(spectra: StudySpectrum[], setNames: ReadonlyMap<string, string> = new Map()): Record<string, unknown>[] {
  const traces: Record<string, unknown>[] = spectra.map((s, k) => ({
    type: 'scatter',
    mode: 'lines',
    name: setNames.has(s.seed) ? `N = ${s.N} (${setNames.get(s.seed)})` : `N = ${s.N} (seed ${s.seed})`,
    x: s.eigenvalues.map((_, r) => r + 1),
    y: s.eigenvalues,
    line: { color: k % 2 === 0 ? plotPalette.data : plotPalette.dataSoft, width: 1.2, dash: ['solid', 'dot', 'dashdot', 'longdash'][Math.floor(k / 2) % 4] },
  }));
  for (const s of spectra) {
    for (const cut of s.cuts) {
      traces.push({
        type: 'scatter',
        mode: 'lines',
        name: `cut (${cut.rule})`,
        x: [1, s.eigenvalues.length],
        y: [cut.cutoff, cut.cutoff],
        line: { color: plotPalette.cut, width: 1, dash: 'dash' },
        showlegend: s === spectra[0],
        legendgroup: 'cuts',
        hoverinfo: 'skip',
      });
    }
  }
  return traces;
}
