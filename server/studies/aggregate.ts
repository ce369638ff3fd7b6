import type { StudyAggregate, StudyEntropy, StudyFit } from '@shared/studies';

/** Mean and sample standard deviation (n − 1 in the denominator; null for fewer than two values). */
export function meanAndDeviation(values: number[]): { mean: number; sd: number | null } {
  const count = values.length;
  if (count === 0) throw new RangeError('no values to average');
  const mean = values.reduce((s, v) => s + v, 0) / count;
  if (count < 2) return { mean, sd: null };
  const ss = values.reduce((s, v) => s + (v - mean) ** 2, 0);
  return { mean, sd: Math.sqrt(ss / (count - 1)) };
}

/**
 * Ensemble over seeds for each (N, subregion, rule): mean number of elements of the sprinkling and of
 * the subregion, mean S, its sample standard deviation and the standard error of the mean sd/√seeds
 * (common practice). Rows come out ordered by rule, subregion (in first-seen order), then N.
 */
export function aggregateEntropies(entropies: StudyEntropy[]): StudyAggregate[] {
  const groups = new Map<string, StudyEntropy[]>();
  const ruleOrder: string[] = [];
  const subregionOrder: string[] = [];
  for (const e of entropies) {
    if (!ruleOrder.includes(e.rule)) ruleOrder.push(e.rule);
    if (!subregionOrder.includes(e.subregion)) subregionOrder.push(e.subregion);
    const key = JSON.stringify([e.rule, e.subregion, e.N]);
    const group = groups.get(key);
    if (group) group.push(e);
    else groups.set(key, [e]);
  }
  const rows: StudyAggregate[] = [];
  for (const group of groups.values()) {
    const first = group[0]!;
    const S = meanAndDeviation(group.map((e) => e.S));
    rows.push({
      N: first.N,
      subregion: first.subregion,
      fraction: first.fraction,
      rule: first.rule,
      seeds: group.length,
      meanElements: meanAndDeviation(group.map((e) => e.elements)).mean,
      meanN: meanAndDeviation(group.map((e) => e.n)).mean,
      meanS: S.mean,
      sdS: S.sd,
      seS: S.sd === null ? null : S.sd / Math.sqrt(group.length),
    });
  }
  return rows.sort(
    (a, b) =>
      ruleOrder.indexOf(a.rule) - ruleOrder.indexOf(b.rule) ||
      subregionOrder.indexOf(a.subregion) - subregionOrder.indexOf(b.subregion) ||
      a.N - b.N,
  );
}

export interface LineFit {
  points: number;
  slope: number;
  slopeError: number | null;
  intercept: number;
  interceptError: number | null;
  rSquared: number | null;
  reducedChiSquared: number | null;
  weighting: 'inverse-variance' | 'unweighted';
}

/**
 * Weighted least-squares line y = a x + c (e.g. Bevington & Robinson, Data Reduction and Error
 * Analysis, ch. 6; recalled from memory). With weights w_i = 1/σ_i², Δ = Σw Σwx² − (Σwx)²:
 *   a = (Σw Σwxy − Σwx Σwy)/Δ,  c = (Σwx² Σwy − Σwx Σwxy)/Δ,  σ_a² = Σw/Δ,  σ_c² = Σwx²/Δ,
 * the errors taking the σ_i as known (numpy polyfit with w = 1/σ and cov='unscaled').
 * Without σ (some point from a single seed) every w_i = 1 and the errors are scaled by the residual
 * variance s² = Σ(y − ŷ)²/(m − 2), i.e. the ordinary least-squares standard errors (null for m = 2).
 * R² = 1 − Σw(y − ŷ)²/Σw(y − ȳ_w)² with the weighted mean ȳ_w; null when every y is equal.
 */
export function weightedLineFit(xs: number[], ys: number[], sigmas: (number | null)[] | null): LineFit {
  const m = xs.length;
  if (m < 2 || ys.length !== m) throw new RangeError('a line fit needs at least two points, with one y per x');
  const weighted = sigmas !== null && sigmas.length === m && sigmas.every((s) => s !== null && Number.isFinite(s) && s > 0);
  const w = weighted ? (sigmas as number[]).map((s) => 1 / (s * s)) : xs.map(() => 1);
  let sw = 0, swx = 0, swy = 0, swxx = 0, swxy = 0;
  for (let i = 0; i < m; i++) {
    sw += w[i]!;
    swx += w[i]! * xs[i]!;
    swy += w[i]! * ys[i]!;
    swxx += w[i]! * xs[i]! * xs[i]!;
    swxy += w[i]! * xs[i]! * ys[i]!;
  }
  const delta = sw * swxx - swx * swx;
  if (!(Math.abs(delta) > 1e-300) || !(delta > 1e-12 * sw * swxx)) throw new RangeError('a line fit needs at least two different x values');
  const slope = (sw * swxy - swx * swy) / delta;
  const intercept = (swxx * swy - swx * swxy) / delta;
  let chi2 = 0;
  let total = 0;
  const meanY = swy / sw;
  for (let i = 0; i < m; i++) {
    chi2 += w[i]! * (ys[i]! - slope * xs[i]! - intercept) ** 2;
    total += w[i]! * (ys[i]! - meanY) ** 2;
  }
  const rSquared = total > 0 ? 1 - chi2 / total : null;
  let slopeError: number | null;
  let interceptError: number | null;
  if (weighted) {
    slopeError = Math.sqrt(sw / delta);
    interceptError = Math.sqrt(swxx / delta);
  } else if (m > 2) {
    const s2 = chi2 / (m - 2);
    slopeError = Math.sqrt((s2 * sw) / delta);
    interceptError = Math.sqrt((s2 * swxx) / delta);
  } else {
    slopeError = null;
    interceptError = null;
  }
  return {
    points: m,
    slope,
    slopeError,
    intercept,
    interceptError,
    rSquared,
    reducedChiSquared: weighted && m > 2 ? chi2 / (m - 2) : null,
    weighting: weighted ? 'inverse-variance' : 'unweighted',
  };
}

/** x of the log model: ln √n̄ = ½ ln n̄ of the mean subregion size. */
export const logSqrt = (n: number) => 0.5 * Math.log(n);

/**
 * Fits of each rule's aggregates: S against ln √n̄ (slope b, expected near 1/3 with double truncation,
 * server/engine/README.md §9) and S against n̄ (the volume-law slope), once over every aggregate of the rule
 * (`subregion` null) and once per subregion across N (the ultraviolet scaling at fixed ℓ/L). A group
 * whose points share one x (or has fewer than two) gets no fit.
 */
export function fitAggregates(aggregates: StudyAggregate[]): StudyFit[] {
  const fits: StudyFit[] = [];
  const rules = [...new Set(aggregates.map((a) => a.rule))];
  for (const rule of rules) {
    const ofRule = aggregates.filter((a) => a.rule === rule);
    const subregions = [...new Set(ofRule.map((a) => a.subregion))];
    const groups: [string | null, StudyAggregate[]][] = [[null, ofRule], ...subregions.map((s) => [s, ofRule.filter((a) => a.subregion === s)] as [string, StudyAggregate[]])];
    if (subregions.length === 1) groups.splice(1);
    for (const [subregion, rows] of groups) {
      if (rows.length < 2) continue;
      const sigmas = rows.map((r) => r.seS);
      const ys = rows.map((r) => r.meanS);
      for (const model of ['log', 'linear'] as const) {
        const xs = rows.map((r) => (model === 'log' ? logSqrt(r.meanN) : r.meanN));
        try {
          fits.push({ rule, subregion, model, ...weightedLineFit(xs, ys, sigmas) });
        } catch (error) {
          if (!(error instanceof RangeError)) throw error;
        }
      }
    }
  }
  return fits;
}
