import type { StudyAggregate, StudyEntropy, StudyFit } from '@shared/studies';
import { renyiQuantity, sortRenyiKeys } from '@shared/studies';
import { continuumMutualInformation } from '../engine/continuum';

/** Mean and sample standard deviation (n − 1 in the denominator; null for fewer than two values). */
export function meanAndDeviation(values: number[]): { mean: number; sd: number | null } {
  const count = values.length;
  if (count === 0) throw new RangeError('no values to average');
  const mean = values.reduce((s, v) => s + v, 0) / count;
  if (count < 2) return { mean, sd: null };
  const ss = values.reduce((s, v) => s + (v - mean) ** 2, 0);
  return { mean, sd: Math.sqrt(ss / (count - 1)) };
}

/** Mean and standard error sd/√count of values, the standard error null for a single value. */
function meanWithError(values: number[]): { mean: number; se: number | null } {
  const { mean, sd } = meanAndDeviation(values);
  return { mean, se: sd === null ? null : sd / Math.sqrt(values.length) };
}

/** Mean ± SE of each keyed value (S_α by renyiKey) over rows that all carry the key. */
function keyedMeans(records: (Record<string, number> | undefined)[]): Record<string, { mean: number; se: number | null }> | undefined {
  if (records.some((r) => r === undefined)) return undefined;
  const keys = Object.keys(records[0]!);
  return Object.fromEntries(keys.map((k) => [k, meanWithError(records.map((r) => r![k]!))]));
}

/**
 * Ensemble over seeds for each (N, subregion, rule): mean number of elements of the sprinkling and of
 * the subregion, mean S, its sample standard deviation and the standard error of the mean sd/√seeds
 * (common practice); the same mean ± SE of each S_α, and for a pair of ⟨I⟩ (and each I_α).
 * Rows come out ordered by rule, subregion (in first-seen order), then N.
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
    const row: StudyAggregate = {
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
    };
    const renyi = keyedMeans(group.map((e) => e.renyi));
    if (renyi) row.renyi = renyi;
    if (first.pair) {
      const I = meanAndDeviation(group.map((e) => e.pair!.I));
      const renyiI = keyedMeans(group.map((e) => e.pair!.renyiI));
      row.pair = {
        size: first.pair.size,
        separation: first.pair.separation,
        meanI: I.mean,
        sdI: I.sd,
        seI: I.sd === null ? null : I.sd / Math.sqrt(group.length),
        ...(renyiI ? { renyiI } : {}),
      };
    }
    rows.push(row);
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

/** A fitted quantity of the aggregates: its key in StudyFit.quantity, and its mean ± SE in a row (undefined where absent). */
interface FittedQuantity {
  key: string;
  of(row: StudyAggregate): { mean: number; se: number | null } | undefined;
}

const entropyQuantity: FittedQuantity = { key: 'S', of: (r) => ({ mean: r.meanS, se: r.seS }) };

const renyiFitQuantity = (key: string): FittedQuantity => ({ key: renyiQuantity(key), of: (r) => r.renyi?.[key] });

/**
 * Fits of each rule's aggregates: S against ln √n̄ (slope b, expected near 1/3 with double truncation,
 * server/engine/README.md §9) and S against n̄ (the volume-law slope), once over every aggregate of the rule
 * (`subregion` null) and once per subregion across N (the ultraviolet scaling at fixed ℓ/T); each S_α
 * of the study's Rényi orders against ln √n̄ the same way. A group whose points share one x (or has
 * fewer than two) gets no fit. Pairs are fitted by pairDecayFits instead (their S is that of A∪B, whose
 * size changes with d as well as N).
 */
export function fitAggregates(aggregates: StudyAggregate[]): StudyFit[] {
  const single = aggregates.filter((a) => !a.pair);
  const renyiKeys = sortRenyiKeys(single.flatMap((a) => Object.keys(a.renyi ?? {})));
  const fits: StudyFit[] = [];
  for (const [quantity, models] of [
    [entropyQuantity, ['log', 'linear']],
    ...renyiKeys.map((k) => [renyiFitQuantity(k), ['log']] as const),
  ] as [FittedQuantity, readonly ('log' | 'linear')[]][]) {
    fits.push(...quantityFits(single, quantity, models));
  }
  return [...fits, ...pairDecayFits(aggregates)];
}

function quantityFits(aggregates: StudyAggregate[], quantity: FittedQuantity, models: readonly ('log' | 'linear')[]): StudyFit[] {
  const fits: StudyFit[] = [];
  const rules = [...new Set(aggregates.map((a) => a.rule))];
  for (const rule of rules) {
    const ofRule = aggregates.filter((a) => a.rule === rule && quantity.of(a) !== undefined);
    const subregions = [...new Set(ofRule.map((a) => a.subregion))];
    const groups: [string | null, StudyAggregate[]][] = [[null, ofRule], ...subregions.map((s) => [s, ofRule.filter((a) => a.subregion === s)] as [string, StudyAggregate[]])];
    if (subregions.length === 1) groups.splice(1);
    for (const [subregion, rows] of groups) {
      if (rows.length < FIT_MIN_POINTS) continue;
      const values = rows.map((r) => quantity.of(r)!);
      const sigmas = values.map((v) => v.se);
      const ys = values.map((v) => v.mean);
      for (const model of models) {
        const xs = rows.map((r) => (model === 'log' ? logSqrt(r.meanN) : r.meanN));
        try {
          fits.push({ rule, subregion, model, quantity: quantity.key, ...weightedLineFit(xs, ys, sigmas) });
        } catch (error) {
          if (!(error instanceof RangeError)) throw error;
        }
      }
    }
  }
  return fits;
}

/**
 * No fit below this many points: a line through two points has R² = 1 and no scatter to judge it by,
 * which reads as agreement while a study is still filling in (the same for the log-log fits of I,
 * counted over the separations with ⟨I⟩ > 0).
 */
export const FIT_MIN_POINTS = 3;

/**
 * The decay of the mutual information with the separation: per (rule, size ℓ/T, N) a weighted fit of
 * ln⟨I⟩ against ln(d/T) over the separations whose ⟨I⟩ > 0 (σ of ln⟨I⟩ = SE/⟨I⟩ to first order, common
 * practice), at least FIT_MIN_POINTS of them, with `excluded` counting the ones left out. Beside
 * it, `continuum` holds the slope of the same (unweighted) log-log fit through the continuum two-interval
 * trend continuumMutualInformation(ℓ, ℓ, d) at those d/T values (Calabrese–Cardy 2004; Casini–Huerta
 * 2009; server/engine/README.md §15): the trend's shape, to compare with, not a prediction of the values.
 */
export function pairDecayFits(aggregates: StudyAggregate[]): StudyFit[] {
  const pairs = aggregates.filter((a) => a.pair);
  const groups = new Map<string, StudyAggregate[]>();
  for (const a of pairs) {
    const key = JSON.stringify([a.rule, a.pair!.size, a.N]);
    groups.set(key, [...(groups.get(key) ?? []), a]);
  }
  const fits: StudyFit[] = [];
  for (const rows of groups.values()) {
    const positive = rows.filter((r) => r.pair!.meanI > 0).sort((p, q) => p.pair!.separation - q.pair!.separation);
    if (positive.length < FIT_MIN_POINTS) continue;
    const { rule, N } = rows[0]!;
    const size = rows[0]!.pair!.size;
    const separations = positive.map((r) => r.pair!.separation);
    const xs = separations.map(Math.log);
    const ys = positive.map((r) => Math.log(r.pair!.meanI));
    const sigmas = positive.map((r) => (r.pair!.seI === null ? null : r.pair!.seI / r.pair!.meanI));
    try {
      const measured = weightedLineFit(xs, ys, sigmas);
      const trend = weightedLineFit(xs, separations.map((d) => Math.log(continuumMutualInformation(size, size, d))), null);
      fits.push({
        rule,
        subregion: null,
        model: 'loglog',
        quantity: 'I',
        size,
        N,
        excluded: rows.length - positive.length,
        continuum: { slope: trend.slope, from: separations[0]!, to: separations[separations.length - 1]! },
        ...measured,
      });
    } catch (error) {
      if (!(error instanceof RangeError)) throw error;
    }
  }
  return fits;
}
