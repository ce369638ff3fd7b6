/**
 * A figure for a paper as data: axes, series and labels, laid out once into drawing primitives that
 * two painters (svg.ts, pdf.ts) turn into files. Math is written as Unicode (λₖ, ℓ, √n), never TeX.
 */

export interface FigurePoint {
  x: number;
  y: number;
  /** a symmetric error bar on y (an ensemble's standard error) */
  error?: number | null;
}

/**
 * What a series is, which fixes its look (DEVELOPERS.md "Look and words"): measured data in ink with
 * markers, continuum and reference curves in the reference green, fits as ink lines, cuts dashed accent.
 */
export type SeriesRole = 'data' | 'reference' | 'fit' | 'cut';

export interface FigureSeries {
  label: string;
  role: SeriesRole;
  points: FigurePoint[];
}

export interface FigureSpec {
  title: string;
  xLabel: string;
  yLabel: string;
  xLog?: boolean;
  yLog?: boolean;
  series: FigureSeries[];
}

export type Primitive =
  | { type: 'line'; points: [number, number][]; colour: string; width: number; dash?: number[] }
  | { type: 'marker'; x: number; y: number; radius: number; colour: string; shape: 'circle' | 'square' | 'diamond' }
  | { type: 'text'; x: number; y: number; text: string; size: number; colour: string; anchor: 'start' | 'middle' | 'end'; rotate?: number };

export interface Scene {
  width: number;
  height: number;
  primitives: Primitive[];
}

export const figureColours = { ink: '#1d1b22', inkSoft: '#4a4753', inkFaint: '#8a8693', rule: '#d9d3c7', accent: '#4b3fb0', reference: '#7d9a86' };
/** Data series after the first are told apart by shade and marker as well as by legend. */
// the accent is for cuts, the green for the continuum: data stay in shades of ink
const dataShades = [figureColours.ink, figureColours.inkFaint, figureColours.inkSoft];
const markerShapes = ['circle', 'square', 'diamond'] as const;

const WIDTH = 640;
/** the plot's own height; the legend adds a row of 16 per two series below it */
const PLOT_HEIGHT = 270;
const frame = { left: 72, right: 20, top: 40 };

/** Tick values of a linear axis: 1, 2 or 5 times a power of ten, about five of them. */
export function linearTicks(low: number, high: number): number[] {
  if (!(high > low)) return [low];
  const raw = (high - low) / 5;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw)!;
  const ticks: number[] = [];
  for (let v = Math.ceil(low / step) * step; v <= high + step * 1e-9; v += step) ticks.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return ticks;
}

/** Decades of a log axis inside [low, high] (positive). */
export function logTicks(low: number, high: number): number[] {
  const first = Math.ceil(Math.log10(low) - 1e-9);
  const last = Math.floor(Math.log10(high) + 1e-9);
  // at most about seven labelled decades
  const step = Math.max(1, Math.ceil((last - first + 1) / 7));
  const ticks: number[] = [];
  for (let e = first; e <= last; e += step) ticks.push(10 ** e);
  return ticks.length ? ticks : [low, high];
}

const superscripts: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

function tickText(value: number, log: boolean): string {
  if (log) {
    const e = Math.round(Math.log10(value));
    if (e >= -2 && e <= 3) return String(Number(value.toPrecision(3)));
    return `10${String(e).split('').map((c) => superscripts[c] ?? c).join('')}`;
  }
  return String(Number(value.toPrecision(6))).replace('-', '−');
}

function extent(values: number[], log: boolean): [number, number] {
  const usable = values.filter((v) => Number.isFinite(v) && (!log || v > 0));
  if (usable.length === 0) return log ? [1, 10] : [0, 1];
  let low = Math.min(...usable);
  let high = Math.max(...usable);
  if (log) return low === high ? [low / 10, high * 10] : [low / 1.2, high * 1.2];
  if (low === high) return [low - 1, high + 1];
  const pad = (high - low) * 0.05;
  low -= pad;
  high += pad;
  return [low, high];
}

/** Lays a figure out 640 wide: frame, ticks, labels, series, and the legend below the plot. */
export function layoutFigure(spec: FigureSpec): Scene {
  const primitives: Primitive[] = [];
  const shown = spec.series.filter((s) => s.points.length > 0);
  // two legend entries a row while the longest label (about 0.55 em a character) fits half the width
  const legendColumns = Math.max(0, ...shown.map((s) => s.label.length)) * 10 * 0.55 + 28 <= 280 ? 2 : 1;
  const legendRows = Math.ceil(shown.length / legendColumns);
  const HEIGHT = frame.top + PLOT_HEIGHT + 60 + legendRows * 16 + 10;
  const xs = spec.series.flatMap((s) => s.points.map((p) => p.x));
  const ys = spec.series.flatMap((s) => s.points.flatMap((p) => (p.error ? [p.y - p.error, p.y + p.error] : [p.y])));
  const [x0, x1] = extent(xs, spec.xLog ?? false);
  const [y0, y1] = extent(ys, spec.yLog ?? false);
  const plot = { left: frame.left, right: WIDTH - frame.right, top: frame.top, bottom: frame.top + PLOT_HEIGHT };
  const scale = (v: number, low: number, high: number, log: boolean) => (log ? (Math.log(v) - Math.log(low)) / (Math.log(high) - Math.log(low)) : (v - low) / (high - low));
  const px = (x: number) => plot.left + scale(x, x0, x1, spec.xLog ?? false) * (plot.right - plot.left);
  const py = (y: number) => plot.bottom - scale(y, y0, y1, spec.yLog ?? false) * (plot.bottom - plot.top);
  const inside = (p: FigurePoint) => Number.isFinite(p.x) && Number.isFinite(p.y) && (!spec.xLog || p.x > 0) && (!spec.yLog || p.y > 0);

  primitives.push({ type: 'text', x: WIDTH / 2, y: 22, text: spec.title, size: 13, colour: figureColours.ink, anchor: 'middle' });
  const axisTicks = (log: boolean, low: number, high: number) => (log ? logTicks(low, high) : linearTicks(low, high));
  for (const t of axisTicks(spec.xLog ?? false, x0, x1)) {
    const x = px(t);
    primitives.push({ type: 'line', points: [[x, plot.bottom], [x, plot.bottom + 5]], colour: figureColours.ink, width: 0.8 });
    primitives.push({ type: 'text', x, y: plot.bottom + 18, text: tickText(t, spec.xLog ?? false), size: 10, colour: figureColours.inkSoft, anchor: 'middle' });
  }
  for (const t of axisTicks(spec.yLog ?? false, y0, y1)) {
    const y = py(t);
    primitives.push({ type: 'line', points: [[plot.left - 5, y], [plot.left, y]], colour: figureColours.ink, width: 0.8 });
    primitives.push({ type: 'text', x: plot.left - 8, y: y + 3.5, text: tickText(t, spec.yLog ?? false), size: 10, colour: figureColours.inkSoft, anchor: 'end' });
  }
  primitives.push({
    type: 'line',
    points: [[plot.left, plot.top], [plot.left, plot.bottom], [plot.right, plot.bottom], [plot.right, plot.top], [plot.left, plot.top]],
    colour: figureColours.ink,
    width: 0.8,
  });
  primitives.push({ type: 'text', x: (plot.left + plot.right) / 2, y: plot.bottom + 38, text: spec.xLabel, size: 12, colour: figureColours.ink, anchor: 'middle' });
  primitives.push({ type: 'text', x: 18, y: (plot.top + plot.bottom) / 2, text: spec.yLabel, size: 12, colour: figureColours.ink, anchor: 'middle', rotate: -90 });

  let dataIndex = 0;
  const legend: { label: string; sample: (x: number, y: number) => Primitive[] }[] = [];
  for (const series of spec.series) {
    const points = series.points.filter(inside);
    if (points.length === 0) continue;
    if (series.role === 'data') {
      const colour = dataShades[dataIndex % dataShades.length]!;
      const shape = markerShapes[dataIndex % markerShapes.length]!;
      dataIndex++;
      for (const p of points) {
        if (p.error) {
          const low = spec.yLog ? Math.max(p.y - p.error, y0) : p.y - p.error;
          primitives.push({ type: 'line', points: [[px(p.x), py(low)], [px(p.x), py(p.y + p.error)]], colour, width: 0.8 });
        }
        primitives.push({ type: 'marker', x: px(p.x), y: py(p.y), radius: points.length > 60 ? 1.6 : 3, colour, shape });
      }
      legend.push({ label: series.label, sample: (x, y) => [{ type: 'marker', x: x + 10, y, radius: 3, colour, shape }] });
      continue;
    }
    const style =
      series.role === 'reference'
        ? { colour: figureColours.reference, width: 1.6 }
        : series.role === 'cut'
          ? { colour: figureColours.accent, width: 1, dash: [5, 4] }
          : { colour: figureColours.ink, width: 1.2 };
    const sorted = [...points].sort((p, q) => p.x - q.x);
    primitives.push({ type: 'line', points: sorted.map((p) => [px(p.x), py(p.y)] as [number, number]), ...style });
    legend.push({ label: series.label, sample: (x, y) => [{ type: 'line', points: [[x, y], [x + 20, y]], ...style }] });
  }

  // the legend in rows below the axis label
  legend.forEach((entry, k) => {
    const x = plot.left + (k % legendColumns) * 280;
    const y = plot.bottom + 62 + Math.floor(k / legendColumns) * 16;
    primitives.push(...entry.sample(x, y));
    primitives.push({ type: 'text', x: x + 28, y: y + 3.5, text: entry.label, size: 10, colour: figureColours.ink, anchor: 'start' });
  });
  return { width: WIDTH, height: HEIGHT, primitives };
}
