import { formatQuantity } from '@shared/precision';
import { diamondOutline, regionOutlineOf, regionSpecSchema } from '@shared/regions';
import type { RunPoints, RunResult } from '@shared/runs';
import { decadesSpanned, logAxisStep } from '../../../lib/plotTheme';
import { renyiLabel, sortedRenyiOrders, type RenyiOrder } from '@shared/vacuum';

/**
 * Plot data of a run, kept apart from the components so it can be tested: the spectrum (positive
 * eigenvalues of iΔ by rank, log-log), the compare overlay and the (t, x) scatter of the points.
 */

export interface PlotColors {
  data: string;
  dataSoft: string;
  reference: string;
  cut: string;
}

type Trace = Record<string, unknown> & { name: string; x: number[]; y: number[] };

function ranks(count: number): number[] {
  return Array.from({ length: count }, (_, k) => k + 1);
}

/** Log axes cannot show zero or negative values; those ranks are dropped from the trace. */
function positivePairs(xs: number[], ys: number[]): { x: number[]; y: number[] } {
  const x: number[] = [];
  const y: number[] = [];
  for (let k = 0; k < ys.length; k++) {
    if (ys[k] > 0 && Number.isFinite(ys[k])) {
      x.push(xs[k]);
      y.push(ys[k]);
    }
  }
  return { x, y };
}

const mono = '"JetBrains Mono", ui-monospace, monospace';

/**
 * The spectrum of one run: kept modes in ink, discarded ones in the soft ink, the continuum N/(4x_k)
 * of a 2D diamond in the reference colour and the cut λc as a dashed accent line across all ranks.
 * A knee cut adds its rank as a dotted accent line, the ranks it moves to when its tolerance is halved
 * or raised by half as a pale accent band, and the law the finder fitted as a thin dotted line.
 */
export function spectrumTraces(
  result: Pick<RunResult, 'eigenvalues' | 'continuum' | 'cutoff' | 'modesKept'> & { knee?: RunResult['knee'] },
  colors: PlotColors,
): Trace[] {
  const all = ranks(result.eigenvalues.length);
  const kept = positivePairs(all.slice(0, result.modesKept), result.eigenvalues.slice(0, result.modesKept));
  const dropped = positivePairs(all.slice(result.modesKept), result.eigenvalues.slice(result.modesKept));
  const traces: Trace[] = [
    {
      name: `kept modes (${result.modesKept})`,
      type: 'scatter',
      mode: 'markers',
      ...kept,
      marker: { color: colors.data, size: 5 },
      hovertemplate: 'rank %{x}<br>λ = %{y:.6g}<extra></extra>',
    },
  ];
  if (dropped.x.length > 0) {
    traces.push({
      name: `discarded (${result.eigenvalues.length - result.modesKept})`,
      type: 'scatter',
      mode: 'markers',
      ...dropped,
      marker: { color: colors.dataSoft, size: 3, opacity: 0.45 },
      hovertemplate: 'rank %{x}<br>λ = %{y:.6g}<extra></extra>',
    });
  }
  if (result.continuum && result.continuum.length > 0) {
    traces.push({
      name: 'continuum N/(4x_k)',
      type: 'scatter',
      mode: 'lines',
      ...positivePairs(ranks(result.continuum.length), result.continuum),
      line: { color: colors.reference, width: 2 },
      hovertemplate: 'rank %{x}<br>continuum %{y:.6g}<extra></extra>',
    });
  }
  if (result.cutoff > 0 && all.length > 0) {
    traces.push({
      name: `cut λc = ${formatQuantity(result.cutoff, 'cut')}`,
      type: 'scatter',
      mode: 'lines',
      x: [1, all.length],
      y: [result.cutoff, result.cutoff],
      line: { color: colors.cut, width: 1.5, dash: 'dash' },
      hoverinfo: 'skip',
    });
  }
  if (result.knee && all.length > 0) {
    const knee = kneeTraces(result.knee, result.modesKept, result.eigenvalues, result.continuum, colors);
    // the band goes under the markers; its legend entry still comes last
    if (knee.band) traces.unshift(knee.band);
    traces.push(...knee.lines);
  }
  return traces;
}

function percent(fraction: number): string {
  return `${Number((fraction * 100).toPrecision(3))} %`;
}

/**
 * The knee drawn across the plot's height: a vertical line at the rank kept, the band of ranks between
 * the knee at half and at 1.5 times its tolerance (runs stored before the range have none) and the
 * fitted law a·k^(−p) down to the end of that band, so the spectrum is seen leaving it.
 */
function kneeTraces(
  knee: NonNullable<RunResult['knee']>,
  modesKept: number,
  eigenvalues: number[],
  continuum: number[] | null,
  colors: PlotColors,
): { band: Trace | null; lines: Trace[] } {
  let low = Infinity;
  let high = -Infinity;
  for (const v of [...eigenvalues, ...(continuum ?? [])]) {
    if (v > 0 && Number.isFinite(v)) {
      low = Math.min(low, v);
      high = Math.max(high, v);
    }
  }
  if (!(high >= low)) return { band: null, lines: [] };
  const range = knee.rankRange;
  let band: Trace | null = null;
  if (range) {
    const from = Math.max(1, Math.min(range.low, range.high, modesKept));
    const to = Math.max(range.low, range.high, modesKept);
    band = {
      name: `knee at tolerance ${percent(range.lowTolerance)} to ${percent(range.highTolerance)}: ${range.low} to ${range.high} modes`,
      type: 'scatter',
      mode: 'lines',
      x: [from, to, to, from, from],
      y: [low, low, high, high, low],
      fill: 'toself',
      fillcolor: colors.cut,
      opacity: 0.12,
      line: { width: 0, color: colors.cut },
      legendrank: 1001,
      hoverinfo: 'skip',
    };
  }
  const lines: Trace[] = [];
  lines.push({
    name: `knee: ${modesKept} modes follow the fitted law within ${percent(knee.tolerance)}`,
    type: 'scatter',
    mode: 'lines',
    x: [modesKept, modesKept],
    y: [low, high],
    line: { color: colors.cut, width: 1.5, dash: 'dot' },
    hovertemplate: `knee at rank ${modesKept}<extra></extra>`,
  });
  const lawRanks = ranks(Math.min(eigenvalues.length, Math.max(1, modesKept, range?.high ?? 0)));
  lines.push({
    name: `fitted law ${formatPlotNumber(knee.amplitude)}·k^(−${formatPlotNumber(knee.exponent)})`,
    type: 'scatter',
    mode: 'lines',
    ...positivePairs(lawRanks, lawRanks.map((k) => knee.amplitude * k ** -knee.exponent)),
    line: { color: colors.dataSoft, width: 1, dash: 'dot' },
    hovertemplate: 'rank %{x}<br>fitted law %{y:.6g}<extra></extra>',
  });
  return { band, lines };
}

export function formatPlotNumber(value: number): string {
  return Number(value.toPrecision(4)).toString();
}

export interface CompareRun {
  id: string;
  label: string;
  N: number;
  eigenvalues: number[];
  continuum: number[] | null;
  cutoff: number;
}

/** Marks and colours for up to six overlaid runs: ink and accent tones, told apart by symbol too. */
export function compareStyles(colors: PlotColors & { accentDeep: string; inkFaint: string }) {
  return [
    { color: colors.data, symbol: 'circle' },
    { color: colors.cut, symbol: 'square' },
    { color: colors.dataSoft, symbol: 'triangle-up' },
    { color: colors.accentDeep, symbol: 'diamond' },
    { color: colors.inkFaint, symbol: 'cross' },
    { color: colors.cut, symbol: 'x' },
  ];
}

/**
 * Overlay of several spectra. With `normalised`, eigenvalues are divided by N so runs of different
 * size share an axis; the 2D-diamond continuum then becomes 1/(4x_k) for every N and is drawn once.
 */
export function compareTraces(runs: CompareRun[], normalised: boolean, colors: Parameters<typeof compareStyles>[0]): Trace[] {
  const styles = compareStyles(colors);
  const traces: Trace[] = [];
  runs.forEach((run, index) => {
    const style = styles[index % styles.length];
    const scale = normalised ? 1 / run.N : 1;
    traces.push({
      name: `${run.label} (N = ${run.N})`,
      type: 'scatter',
      mode: 'markers',
      ...positivePairs(ranks(run.eigenvalues.length), run.eigenvalues.map((v) => v * scale)),
      marker: { color: style.color, symbol: style.symbol, size: 5, opacity: 0.85 },
      hovertemplate: `${run.label}<br>rank %{x}<br>${normalised ? 'λ/N' : 'λ'} = %{y:.6g}<extra></extra>`,
    });
    // each run's own cut λc, in the run's colour, so a reader sees where each spectrum was truncated
    if (run.cutoff > 0 && run.eigenvalues.length > 0) {
      const cutText = formatQuantity(run.cutoff * scale, 'cut');
      traces.push({
        name: `${run.label}: cut λc${normalised ? '/N' : ''} = ${cutText}`,
        type: 'scatter',
        mode: 'lines',
        x: [1, Math.max(2, run.eigenvalues.length)],
        y: [run.cutoff * scale, run.cutoff * scale],
        line: { color: style.color, width: 1.25, dash: 'dash' },
        hovertemplate: `${run.label}<br>cut λc${normalised ? '/N' : ''} = ${cutText}<extra></extra>`,
      });
    }
  });
  const withContinuum = runs.filter((r) => r.continuum && r.continuum.length > 0);
  const continuumRuns = normalised
    ? withContinuum.sort((a, b) => b.continuum!.length - a.continuum!.length).slice(0, 1)
    : withContinuum;
  continuumRuns.forEach((run, index) => {
    const scale = normalised ? 1 / run.N : 1;
    traces.push({
      name: normalised ? 'continuum 1/(4x_k)' : `continuum, N = ${run.N}`,
      type: 'scatter',
      mode: 'lines',
      ...positivePairs(ranks(run.continuum!.length), run.continuum!.map((v) => v * scale)),
      line: { color: colors.reference, width: 1.5, dash: normalised || index === 0 ? 'solid' : 'dot' },
      hoverinfo: 'skip',
    });
  });
  return traces;
}

/** The label step of a log axis over these values (src/lib/plotTheme.ts logAxisStep), for an axis whose range includes a value no trace draws (the cut). */
export function logDecadeStep(values: number[]): number | 'D2' {
  return logAxisStep(decadesSpanned(values));
}

/** Plotly's monospace tick font, for the layouts built in the components. */
export const tickFont = { family: mono, size: 11 };

/** The region's boundary in (x, t), drawn behind the points; null where no outline applies. */
export function regionOutline(request: unknown): { x: number[]; y: number[] } | null {
  const region = (request as { sprinkling?: { region?: Record<string, unknown> } } | null)?.sprinkling?.region;
  const parsed = regionSpecSchema.safeParse(region);
  return parsed.success ? regionOutlineOf(parsed.data) : null;
}

/** The causal diamond between two timelike-separated events, as a closed outline in (x, t). */
export const diamondBetween = diamondOutline;

/** The scatter of the points in (x, t) — t upwards, as in a spacetime diagram — with the subregion marked. */
export function pointsTraces(points: RunPoints, request: unknown, colors: PlotColors): Trace[] {
  const tColumn = points.columns.indexOf('t');
  const xColumn = points.columns.indexOf('x');
  const inside = new Set(points.subregionElements ?? []);
  const outer = { x: [] as number[], y: [] as number[] };
  const inner = { x: [] as number[], y: [] as number[] };
  points.points.forEach((row, index) => {
    const target = inside.has(index) ? inner : outer;
    target.x.push(row[xColumn]);
    target.y.push(row[tColumn]);
  });
  const traces: Trace[] = [];
  const outline = regionOutline(request);
  if (outline) {
    traces.push({ name: 'region', type: 'scatter', mode: 'lines', ...outline, line: { color: colors.reference, width: 1 }, hoverinfo: 'skip' });
  }
  traces.push({
    name: points.subregionElements ? `elements (${outer.x.length})` : `elements (${points.points.length})`,
    type: 'scatter',
    mode: 'markers',
    ...outer,
    marker: { color: colors.data, size: 3.5 },
    hovertemplate: 't = %{y:.4f}<br>x = %{x:.4f}<extra></extra>',
  });
  traces.push(...pairTraces(points, request, colors));
  if (points.subregionElements) {
    traces.push({
      name: `subregion (${inner.x.length})`,
      type: 'scatter',
      mode: 'markers',
      ...inner,
      marker: { color: colors.cut, size: 5, symbol: 'circle-open', line: { width: 1.5, color: colors.cut } },
      hovertemplate: 'in subregion<br>t = %{y:.4f}<br>x = %{x:.4f}<extra></extra>',
    });
    const subregion = (request as { subregion?: { kind: string; past: { t: number; x: number }; future: { t: number; x: number } } } | null)?.subregion;
    if (subregion?.kind === 'diamond' && points.dimension === 2) {
      traces.push({
        name: 'subregion boundary',
        type: 'scatter',
        mode: 'lines',
        ...diamondBetween(subregion.past, subregion.future),
        line: { color: colors.cut, width: 1, dash: 'dash' },
        hoverinfo: 'skip',
      });
    }
  }
  return traces;
}

type StoredTips = { kind: string; past: { t: number; x: number }; future: { t: number; x: number } };

/**
 * A and B of a mutual-information pair on the points plot: their elements as open squares (A) and open
 * triangles (B) in the deep accent, so they read apart from the subregion's accent rings without a
 * second colour, and the boundary of each diamond given by tips (2D) as a dotted line.
 */
export function pairTraces(points: RunPoints, request: unknown, colors: PlotColors & { accentDeep?: string }): Trace[] {
  if (!points.pairElements) return [];
  const tColumn = points.columns.indexOf('t');
  const xColumn = points.columns.indexOf('x');
  const color = colors.accentDeep ?? colors.cut;
  const pair = (request as { mutualInformation?: { a: StoredTips; b: StoredTips } } | null)?.mutualInformation;
  const traces: Trace[] = [];
  for (const [side, symbol] of [['a', 'square-open'], ['b', 'triangle-up-open']] as const) {
    const members = points.pairElements[side];
    const label = side.toUpperCase();
    traces.push({
      name: `${label} (${members.length})`,
      type: 'scatter',
      mode: 'markers',
      x: members.map((i) => points.points[i]![xColumn]!),
      y: members.map((i) => points.points[i]![tColumn]!),
      marker: { color, size: 6, symbol, line: { width: 1.2, color } },
      hovertemplate: `in ${label}<br>t = %{y:.4f}<br>x = %{x:.4f}<extra></extra>`,
    });
    const tips = pair?.[side];
    if (tips?.kind === 'diamond' && points.dimension === 2) {
      traces.push({ name: `${label} boundary`, type: 'scatter', mode: 'lines', ...diamondBetween(tips.past, tips.future), line: { color, width: 1, dash: 'dot' }, showlegend: false, hoverinfo: 'skip' });
    }
  }
  return traces;
}

/** The orders of a result's S_α with the von Neumann S at α = 1, ascending, ∞ last. */
export function renyiRows(entropy: Pick<NonNullable<RunResult['entropy']>, 'S' | 'renyi'>): { order: RenyiOrder | 1; key: string; label: string; value: number }[] {
  const renyi = entropy.renyi ?? {};
  const orders = sortedRenyiOrders([...Object.keys(renyi).map((k): RenyiOrder => (k === 'inf' ? 'inf' : Number(k))), 1]);
  return orders.map((order) => {
    const key = order === 'inf' ? 'inf' : String(order);
    return order === 1 ? { order: 1, key, label: 'S (α = 1)', value: entropy.S } : { order, key, label: renyiLabel(order), value: renyi[key]! };
  });
}

/**
 * S_α against α: the finite orders joined in ink with the von Neumann S at α = 1 marked as a larger
 * accent point, and the min-entropy S_∞ (α → ∞ has no place on the axis) as a dashed horizontal line
 * across the plot, labelled S_∞, the value every S_α decreases to.
 */
export function renyiTraces(entropy: Pick<NonNullable<RunResult['entropy']>, 'S' | 'renyi'>, colors: PlotColors): Trace[] {
  const rows = renyiRows(entropy);
  const finite = rows.filter((r) => r.order !== 'inf') as { order: number; value: number; label: string }[];
  const traces: Trace[] = [
    {
      name: 'S_α',
      type: 'scatter',
      mode: 'lines+markers',
      x: finite.map((r) => r.order),
      y: finite.map((r) => r.value),
      line: { color: colors.data, width: 1 },
      marker: { color: colors.data, size: 6 },
      hovertemplate: 'α = %{x}<br>S_α = %{y:.6g}<extra></extra>',
    },
    {
      name: 'S (von Neumann, α = 1)',
      type: 'scatter',
      mode: 'markers',
      x: [1],
      y: [entropy.S],
      marker: { color: colors.cut, size: 9, symbol: 'diamond' },
      hovertemplate: 'α = 1<br>S = %{y:.6g}<extra></extra>',
    },
  ];
  const infinity = rows.find((r) => r.order === 'inf');
  if (infinity) {
    const xs = finite.map((r) => r.order);
    const from = Math.min(...xs);
    const to = Math.max(...xs);
    traces.push({
      name: `S_∞ = ${formatPlotNumber(infinity.value)} (min-entropy, α → ∞)`,
      type: 'scatter',
      mode: 'lines',
      x: [from, to],
      y: [infinity.value, infinity.value],
      line: { color: colors.dataSoft, width: 1.5, dash: 'dash' },
      hovertemplate: `S_∞ = ${formatPlotNumber(infinity.value)}<extra></extra>`,
    });
  }
  return traces;
}
