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

/** Layout defaults every Tacet figure starts from. */
export function baseLayout(overrides: Record<string, unknown> = {}): Record<string, unknown> {
  const axis = {
    gridcolor: plotPalette.grid,
    zerolinecolor: plotPalette.grid,
    linecolor: colors.ink.faint,
    tickfont: { family: '"JetBrains Mono", ui-monospace, monospace', size: 11 },
  };
  return {
    paper_bgcolor: plotPalette.paper,
    plot_bgcolor: plotPalette.paper,
    font: { family: 'system-ui, sans-serif', color: plotPalette.data, size: 12 },
    margin: { l: 56, r: 16, t: 16, b: 44 },
    xaxis: axis,
    yaxis: axis,
    showlegend: true,
    legend: { bgcolor: 'rgba(0,0,0,0)' },
    ...overrides,
  };
}
