import { describe, expect, it } from 'vitest';
import { baseLayout, decadesSpanned, logAxisStep, tidyLogAxes } from '../../src/lib/plotTheme';

// Labels on a log axis: decades when there are several, 1-2-5 within less than about one decade — the
// usual layout of a log scale in printed figures (common practice).
describe('log axes', () => {
  it('label 1-2-5 below about a decade, then every decade, every second or third over very many', () => {
    expect(logAxisStep(decadesSpanned([0.03, 0.2]))).toBe('D2');
    expect(logAxisStep(decadesSpanned([1, 10]))).toBe('D2');
    expect(logAxisStep(decadesSpanned([1, 100]))).toBe(1);
    expect(logAxisStep(decadesSpanned([1e-9, 1]))).toBe(2);
    expect(logAxisStep(decadesSpanned([1e-15, 1]))).toBe(3);
    expect(decadesSpanned([0, -1, Number.NaN, 5])).toBe(0);
  });

  it('takes each axis its own traces, keeps a step a figure set, and adds unlabelled minor ticks to decade labels', () => {
    const layout = {
      xaxis: { type: 'log' },
      yaxis: { type: 'log' },
      xaxis2: { type: 'log', dtick: 1 },
      yaxis2: { type: 'linear' },
    };
    const data = [
      { x: [0.05, 0.1, 0.2], y: Float64Array.from([1e-3, 1, 10]) },
      { x: [1, 1e6], y: [1, 2], xaxis: 'x2', yaxis: 'y2' },
    ];
    const tidy = tidyLogAxes(layout, data) as Record<string, Record<string, unknown>>;
    expect(tidy.xaxis.dtick).toBe('D2');
    expect(tidy.xaxis.minor).toBeUndefined();
    expect(tidy.yaxis.dtick).toBe(1);
    expect(tidy.yaxis.minor).toMatchObject({ dtick: 'D1', showgrid: false });
    expect(tidy.xaxis2.dtick).toBe(1);
    expect(tidy.yaxis2.dtick).toBeUndefined();
    expect(layout.xaxis).toEqual({ type: 'log' });
  });

  it('merges a figure\'s axis over the shared axis style instead of replacing it', () => {
    const layout = baseLayout({ xaxis: { type: 'log', title: { text: 'rank k' } } }) as Record<string, Record<string, unknown>>;
    expect(layout.xaxis.type).toBe('log');
    expect(layout.xaxis.gridcolor).toBeDefined();
    expect(layout.xaxis.tickfont).toBeDefined();
    expect(layout.yaxis.gridcolor).toBe(layout.xaxis.gridcolor);
  });
});
