import type { FigureSeries, FigureSpec } from './figure';

const short = (v: number) => String(Number(v.toPrecision(4))).replace('-', '−');

/** One rule's ensemble points (n, ⟨S⟩ ± SE) and its fit S = b ln √n + c, if any. */
export interface EntropyScalingRule {
  label: string;
  points: { n: number; S: number; se: number | null }[];
  fit: { slope: number; intercept: number; slopeError: number | null } | null;
}

/** S against ln √n per rule, with error bars and each rule's fitted line over its points' range. */
export function entropyScalingFigure(title: string, rules: EntropyScalingRule[]): FigureSpec {
  const series: FigureSeries[] = [];
  for (const rule of rules) {
    const points = rule.points.filter((p) => p.n > 0).map((p) => ({ x: Math.log(Math.sqrt(p.n)), y: p.S, error: p.se }));
    if (points.length === 0) continue;
    series.push({ label: `${rule.label}: ⟨S⟩ ± SE`, role: 'data', points });
    if (rule.fit) {
      const xs = points.map((p) => p.x);
      const ends = [Math.min(...xs), Math.max(...xs)];
      const b = `${short(rule.fit.slope)}${rule.fit.slopeError !== null ? ` ± ${short(rule.fit.slopeError)}` : ''}`;
      series.push({ label: `${rule.label}: fit S = b ln √n + c, b = ${b}`, role: 'fit', points: ends.map((x) => ({ x, y: rule.fit!.slope * x + rule.fit!.intercept })) });
    }
  }
  return { title, xLabel: 'ln √n   (n: elements in the subregion)', yLabel: 'S', series };
}

/** One sprinkling's spectrum: its positive eigenvalues of iΔ, the continuum's at the same ranks, its cuts. */
export interface SpectrumCurve {
  label: string;
  eigenvalues: ArrayLike<number>;
  continuum: ArrayLike<number> | null;
  cuts: { label: string; cutoff: number }[];
}

/**
 * Eigenvalues below this fraction of the largest are the numerical kernel of iΔ (rounding, not modes),
 * and on a log axis they would squeeze the spectrum into its top; the figure leaves them out and says so.
 */
export const SPECTRUM_FIGURE_FLOOR = 1e-6;

/** λₖ against k on log–log axes, each sprinkling in ink, the continuum in green, each cut a dashed line. */
export function spectrumFigure(title: string, curves: SpectrumCurve[]): FigureSpec {
  const series: FigureSeries[] = [];
  for (const curve of curves) {
    const eigenvalues = Array.from(curve.eigenvalues);
    const floor = SPECTRUM_FIGURE_FLOOR * Math.max(0, ...eigenvalues);
    series.push({ label: curve.label, role: 'data', points: eigenvalues.map((y, k) => ({ x: k + 1, y })).filter((p) => p.y >= floor) });
    if (curve.continuum) series.push({ label: `${curve.label}: continuum`, role: 'reference', points: Array.from(curve.continuum, (y, k) => ({ x: k + 1, y })) });
    for (const cut of curve.cuts) {
      series.push({ label: `${curve.label}: cut ${cut.label}, λ = ${short(cut.cutoff)}`, role: 'cut', points: [{ x: 1, y: cut.cutoff }, { x: Math.max(eigenvalues.length, 2), y: cut.cutoff }] });
    }
  }
  return { title, xLabel: 'rank k', yLabel: 'λₖ  (positive eigenvalues of iΔ, those ≥ 10⁻⁶ λ₁)', xLog: true, yLog: true, series };
}
