import { describe, expect, it } from 'vitest';
import { compareTraces, diamondBetween, logDecadeStep, pointsTraces, regionOutline, spectrumTraces } from '../../src/features/runs/lib/plotData';

const colors = { data: 'ink', dataSoft: 'soft', reference: 'sage', cut: 'accent', accentDeep: 'deep', inkFaint: 'faint' };

describe('spectrum plot data', () => {
  const result = { eigenvalues: [10, 5, 2, 1, 1e-9, 0], continuum: [9, 4.5, 3, 2.2, 1.8, 1.5], cutoff: 1.5, modesKept: 3 };

  it('splits kept and discarded modes by rank and drops values a log axis cannot show', () => {
    const [kept, dropped] = spectrumTraces(result, colors);
    expect(kept.x).toEqual([1, 2, 3]);
    expect(kept.y).toEqual([10, 5, 2]);
    expect(kept.marker).toMatchObject({ color: 'ink' });
    // rank 6 has λ = 0: not drawable on log axes
    expect(dropped.x).toEqual([4, 5]);
    expect(dropped.y).toEqual([1, 1e-9]);
  });

  it('draws the continuum in the reference colour and the cut as a dashed accent line over all ranks', () => {
    const traces = spectrumTraces(result, colors);
    const continuum = traces.find((t) => t.name.startsWith('continuum'))!;
    expect(continuum.line).toMatchObject({ color: 'sage' });
    expect(continuum.x).toHaveLength(6);
    const cut = traces.find((t) => t.name.startsWith('cut'))!;
    expect(cut.x).toEqual([1, 6]);
    expect(cut.y).toEqual([1.5, 1.5]);
    expect(cut.line).toMatchObject({ color: 'accent', dash: 'dash' });
  });

  it('has no continuum curve outside 2D diamonds and no cut line when nothing is cut', () => {
    const traces = spectrumTraces({ ...result, continuum: null, cutoff: 0, modesKept: 6 }, colors);
    expect(traces.map((t) => t.name)).toEqual(['kept modes (6)']);
  });

  const knee = { amplitude: 10, exponent: 1, curvature: 0.05, fitWindow: 3, tolerance: 0.05, rankRange: { low: 2, high: 4, lowTolerance: 0.025, highTolerance: 0.075 } };

  it('draws the knee rank, its range as a band under the markers and the fitted law, named in plain words', () => {
    const traces = spectrumTraces({ ...result, knee }, colors);
    const band = traces[0];
    expect(band.name).toBe('knee at tolerance 2.5 % to 7.5 %: 2 to 4 modes');
    expect(band.x).toEqual([2, 4, 4, 2, 2]);
    // the band spans the plotted values: smallest positive eigenvalue or continuum to the largest
    expect(band.y).toEqual([1e-9, 1e-9, 10, 10, 1e-9]);
    expect(band).toMatchObject({ fill: 'toself', fillcolor: 'accent' });
    const line = traces.find((t) => t.name.startsWith('knee:'))!;
    expect(line.name).toBe('knee: 3 modes follow the fitted law within 5 %');
    expect(line.x).toEqual([3, 3]);
    expect(line.line).toMatchObject({ color: 'accent', dash: 'dot' });
    const law = traces.find((t) => t.name.startsWith('fitted law'))!;
    expect(law.name).toBe('fitted law 10·k^(−1)');
    // drawn past the knee to the end of the band, so the spectrum is seen leaving it
    expect(law.x).toEqual([1, 2, 3, 4]);
    [10, 5, 10 / 3, 2.5].forEach((y, i) => expect(law.y[i]).toBeCloseTo(y, 12));
  });

  it('draws a knee stored before the rank range without a band, and nothing for other rules', () => {
    const { rankRange: _, curvature: __, ...older } = knee;
    const traces = spectrumTraces({ ...result, knee: older }, colors);
    expect(traces.some((t) => t.name.startsWith('knee at tolerance'))).toBe(false);
    expect(traces.find((t) => t.name.startsWith('knee:'))?.x).toEqual([3, 3]);
    expect(spectrumTraces({ ...result, knee: null }, colors).some((t) => t.name.startsWith('knee'))).toBe(false);
  });
});

describe('compare overlay', () => {
  const runs = [
    { id: 'a', label: 'A', N: 100, eigenvalues: [20, 10], continuum: [25, 12], cutoff: 1 },
    { id: 'b', label: 'B', N: 400, eigenvalues: [80, 40, 20], continuum: [100, 50, 33], cutoff: 1.6 },
  ];

  it('divides by N when normalised, so runs of different size share the axis, and draws the continuum once', () => {
    const traces = compareTraces(runs, true, colors);
    const spectra = traces.filter((t) => t.mode === 'markers');
    expect(spectra[0].y).toEqual([0.2, 0.1]);
    expect(spectra[1].y).toEqual([0.2, 0.1, 0.05]);
    expect(spectra[0].marker).not.toEqual(spectra[1].marker);
    const continua = traces.filter((t) => t.name.startsWith('continuum'));
    expect(continua).toHaveLength(1);
    expect(continua[0].y).toEqual([0.25, 0.125, 0.0825]);
  });

  it('keeps raw eigenvalues and one continuum per run otherwise', () => {
    const traces = compareTraces(runs, false, colors);
    expect(traces.filter((t) => t.mode === 'markers')[1].y).toEqual([80, 40, 20]);
    expect(traces.filter((t) => t.name.startsWith('continuum'))).toHaveLength(2);
  });

  it('draws each run’s cut λc as a dashed line in the run’s colour, to the precision rule’s digits', () => {
    const traces = compareTraces(runs, false, colors);
    const cuts = traces.filter((t) => t.name.includes('cut λc'));
    expect(cuts.map((t) => t.name)).toEqual(['A: cut λc = 1.000', 'B: cut λc = 1.600']);
    expect(cuts[1].y).toEqual([1.6, 1.6]);
    const spectra = traces.filter((t) => t.mode === 'markers');
    expect(cuts.map((t) => (t.line as { color?: string }).color)).toEqual(spectra.map((t) => (t.marker as { color?: string }).color));
    expect(compareTraces(runs, true, colors).find((t) => t.name.startsWith('B: cut'))!.y).toEqual([0.004, 0.004]);
  });
});

describe('points plot data', () => {
  it('draws the diamond of proper time T with corners at t = ±T/2 and x = ±T/2', () => {
    expect(regionOutline({ sprinkling: { region: { kind: 'diamond2d', properTime: 2 } } })).toEqual({
      x: [0, 1, 0, -1, 0],
      y: [-1, 0, 1, 0, -1],
    });
    expect(regionOutline({})).toBeNull();
  });

  it('finds the side corners of a diamond between two tips from light-cone coordinates', () => {
    // Tips (t, x) = (0, 0) and (2, 0.5): right corner where t − x = 0 meets t + x = 2.5, left where t + x = 0 meets t − x = 1.5.
    const outline = diamondBetween({ t: 0, x: 0 }, { t: 2, x: 0.5 });
    expect(outline.x).toEqual([0, 1.25, 0.5, -0.75, 0]);
    expect(outline.y).toEqual([0, 1.25, 2, 0.75, 0]);
  });

  it('puts t upwards and rings the subregion’s elements', () => {
    const traces = pointsTraces(
      { dimension: 2, columns: ['t', 'x'], points: [[0.1, 0.2], [-0.3, 0.4], [0.5, -0.1]], subregionElements: [1] },
      { sprinkling: { region: { kind: 'diamond2d', properTime: 2 } }, subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } } },
      colors,
    );
    const outer = traces.find((t) => t.name.startsWith('elements'))!;
    const inner = traces.find((t) => t.name.startsWith('subregion ('))!;
    expect(outer.x).toEqual([0.2, -0.1]);
    expect(outer.y).toEqual([0.1, 0.5]);
    expect(inner.x).toEqual([0.4]);
    expect(inner.y).toEqual([-0.3]);
    expect(traces.some((t) => t.name === 'subregion boundary')).toBe(true);
  });
});

describe('log axis ticks', () => {
  it('labels every decade up to seven, then every second or third', () => {
    expect(logDecadeStep([100, 1, 0.01])).toBe(1);
    expect(logDecadeStep([100, 1e-9, 0])).toBe(2);
    expect(logDecadeStep([1e3, 1e-13])).toBe(3);
    expect(logDecadeStep([])).toBe('D2');
    expect(logDecadeStep([0.03, 0.2])).toBe('D2');
  });
});
