import { describe, expect, it } from 'vitest';
import { spectraTraces } from '../../src/features/studies/lib/plotData';

describe('study spectra plot (issue 18 §4)', () => {
  const spectra = [
    { N: 200, seed: 's0', eigenvalues: [5, 2, 1], cuts: [{ rule: 'sqrtN+double', cutoff: 1.12538 }] },
    { N: 400, seed: 's0', eigenvalues: [9, 4, 2, 1], cuts: [{ rule: 'sqrtN+double', cutoff: 1.59155 }] },
  ] as unknown as Parameters<typeof spectraTraces>[0];

  it('labels each cut with the rule’s human label, once in the legend, and its λc by the precision rule', () => {
    const traces = spectraTraces(spectra, new Map(), { 'sqrtN+double': '√N/4π, double truncation' });
    const cuts = traces.filter((t) => String(t.name).startsWith('cut'));
    expect(cuts.map((t) => t.name)).toEqual(['cut: √N/4π, double truncation', 'cut: √N/4π, double truncation']);
    expect(cuts.filter((t) => t.showlegend)).toHaveLength(1);
    expect(String(cuts[1].hovertemplate)).toContain('λc = 1.592');
  });

  it('tells N apart by colour and marker as well as dash', () => {
    const [small, large] = spectraTraces(spectra) as { line: { color: string; dash: string }; marker: { color: string; symbol: string } }[];
    expect(small.line.color).not.toBe(large.line.color);
    expect(small.marker.symbol).not.toBe(large.marker.symbol);
    expect(small.line.dash).not.toBe(large.line.dash);
  });
});
