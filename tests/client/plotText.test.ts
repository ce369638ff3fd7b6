import { describe, expect, it } from 'vitest';
import { typesetPlotObject, typesetPlotText } from '../../src/lib/plotText';

// Issue 18 §4: plot text written as λ_k or k^(−0.9) is set with Plotly's <sub>/<sup> (its documented HTML subset).
describe('plot text typesetting', () => {
  it('sets subscripts and superscripts', () => {
    expect(typesetPlotText('λ_k  (positive eigenvalues of iΔ)')).toBe('λ<sub>k</sub>  (positive eigenvalues of iΔ)');
    expect(typesetPlotText('continuum N/(4x_k)')).toBe('continuum N/(4x<sub>k</sub>)');
    expect(typesetPlotText('fitted law 3.2·k^(−0.91)')).toBe('fitted law 3.2·k<sup>−0.91</sup>');
    expect(typesetPlotText('S_∞ and S_2, then S_A.')).toBe('S<sub>∞</sub> and S<sub>2</sub>, then S<sub>A</sub>.');
    expect(typesetPlotText('cut λ_{c} = 1.31')).toBe('cut λ<sub>c</sub> = 1.31');
    expect(typesetPlotText('no marks here, l/L = 0.5')).toBe('no marks here, l/L = 0.5');
  });

  it('walks traces and layout, touching text fields only', () => {
    const data = [{ name: 'λ_k', x: [1, 2], y: Float64Array.of(3, 4), text: ['a_b', 'c'], hovertemplate: 'λ_k = %{y:.6g}', meta: 'x_y' }];
    const layout = { yaxis: { title: { text: 'λ_k / N' } }, annotations: [{ text: 'S_2' }] };
    expect(typesetPlotObject(data)).toEqual([
      { name: 'λ<sub>k</sub>', x: [1, 2], y: Float64Array.of(3, 4), text: ['a<sub>b</sub>', 'c'], hovertemplate: 'λ<sub>k</sub> = %{y:.6g}', meta: 'x_y' },
    ]);
    expect(typesetPlotObject(layout)).toEqual({ yaxis: { title: { text: 'λ<sub>k</sub> / N' } }, annotations: [{ text: 'S<sub>2</sub>' }] });
  });
});
