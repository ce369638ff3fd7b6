import tailwindConfig from '../../tailwind.config';

const colors = tailwindConfig.theme.extend.colors;

/** Plot colours shared with the page: data in ink, references in sage, cuts as a dashed accent line. */
export const plotPalette = {
  data: colors.ink.DEFAULT,
  dataSoft: colors.ink.soft,
  reference: colors.reference.DEFAULT,
  cut: colors.accent.DEFAULT,
  /** further tones for overlaid runs (a comparison) */
  accentDeep: colors.accent.deep,
  inkFaint: colors.ink.faint,
  grid: colors.rule,
  paper: colors.paper.DEFAULT,
} as const;

const axisStyle = {
  gridcolor: plotPalette.grid,
  zerolinecolor: plotPalette.grid,
  linecolor: colors.ink.faint,
  tickfont: { family: '"JetBrains Mono", ui-monospace, monospace', size: 11 },
};

const axisKey = /^[xy]axis\d*$/;

/**
 * Layout defaults every Tacet figure starts from. An axis a figure sets is merged over the shared axis
 * style rather than replacing it, so every axis has the same grid, line and tick font.
 */
export function baseLayout(overrides: Record<string, unknown> = {}): Record<string, unknown> {
  const merged: Record<string, unknown> = {
    paper_bgcolor: plotPalette.paper,
    plot_bgcolor: plotPalette.paper,
    font: { family: 'system-ui, sans-serif', color: plotPalette.data, size: 12 },
    margin: { l: 56, r: 16, t: 16, b: 44 },
    xaxis: axisStyle,
    yaxis: axisStyle,
    showlegend: true,
    legend: { bgcolor: 'rgba(0,0,0,0)' },
  };
  for (const [key, value] of Object.entries(overrides)) {
    merged[key] = axisKey.test(key) && value && typeof value === 'object' ? { ...axisStyle, ...(value as Record<string, unknown>) } : value;
  }
  return merged;
}

/**
 * The label step of a log axis spanning `decades` decades. Left to itself the plotting library labels
 * 2 and 5 (or every digit) inside each decade, which crowds an axis of several decades; so: below about
 * one decade the 1-2-5 labels ('D2', else an axis of 0.03–0.2 would have one label), from there on
 * every decade, and every second or third when there are very many.
 */
export function logAxisStep(decades: number): number | 'D2' {
  if (!(decades > 1.3)) return 'D2';
  return decades > 14 ? 3 : decades > 7 ? 2 : 1;
}

/** Decades spanned by the positive finite values. */
export function decadesSpanned(values: Iterable<number>): number {
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (v > 0 && Number.isFinite(v)) {
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  return max > min ? Math.log10(max / min) : 0;
}

function* numbersOf(values: unknown): Iterable<number> {
  if (values == null || typeof values === 'string') return;
  const list = values as ArrayLike<unknown>;
  if (typeof list.length !== 'number') return;
  for (let i = 0; i < list.length; i++) if (typeof list[i] === 'number') yield list[i] as number;
}

/**
 * Every log axis of a figure that does not set its own `dtick` gets the step its data call for
 * (logAxisStep), with unlabelled minor ticks inside each decade when only decades are labelled. The data
 * of an axis are the x (or y) of the traces drawn on it (`xaxis: 'x2'` puts a trace on `xaxis2`).
 */
export function tidyLogAxes(layout: Record<string, unknown>, data: Record<string, unknown>[]): Record<string, unknown> {
  let result = layout;
  for (const [key, value] of Object.entries(layout)) {
    if (!axisKey.test(key) || !value || typeof value !== 'object') continue;
    const axis = value as Record<string, unknown>;
    if (axis.type !== 'log' || axis.dtick !== undefined) continue;
    const letter = key[0] as 'x' | 'y';
    const id = letter + key.slice(5);
    const values: number[] = [];
    for (const trace of data) {
      const onAxis = (trace[`${letter}axis`] as string | undefined) ?? letter;
      if (onAxis === id) for (const v of numbersOf(trace[letter])) values.push(v);
    }
    const dtick = logAxisStep(decadesSpanned(values));
    const minor = dtick === 'D2' || axis.minor !== undefined ? {} : { minor: { ticks: 'outside', ticklen: 3, dtick: 'D1', showgrid: false } };
    if (result === layout) result = { ...layout };
    result[key] = { ...axis, dtick, ...minor };
  }
  return result;
}
