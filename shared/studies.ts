import { z } from 'zod';
import { computeTimingSchema } from './computeTiming';
import { formatQuantity, formatWithError } from './precision';
import {
  effectiveRestrictedCut,
  entropyRuleLabel,
  eventSchema,
  formatRestrictedCut,
  formatTruncationRule,
  prngSchema,
  regionKinds,
  regionSpecSchema,
  renyiKey,
  renyiOrdersSchema,
  restrictedCutSchema,
  sortedRenyiOrders,
  truncationRuleSchema,
  type EntropyRuleSettings,
  type RenyiOrder,
} from './vacuum';

/**
 * Scaling studies: a grid of N values × subregions × seeds × cut rules on one kind of region, with
 * ensemble aggregates and fits of the entropy against ln √n and against n. Shared by the study form,
 * the API, the worker and the exports, so a setting means the same thing everywhere.
 */

export const studyStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export const studyStatusSchema = z.enum(studyStatuses);
export type StudyStatus = z.infer<typeof studyStatusSchema>;

export const cellStatusSchema = z.enum(studyStatuses);
export type CellStatus = z.infer<typeof cellStatusSchema>;

/** Cells (one sprinkling each) a single study may hold: enough for a paper figure, bounded for a shared worker. */
export const STUDY_MAX_CELLS = 400;
/** A subregion expected to hold fewer elements gives no meaningful entropy; the form says so beside ℓ/T. */
export const STUDY_MIN_SUBREGION_ELEMENTS = 8;

/**
 * How entropies are computed for one column of the study:
 * - `truncation` cuts the SJ state of the whole region (shared/vacuum.ts rules);
 * - `doubleTruncation` also drops the modes of the restricted iΔ_c at or below `restrictedCut`
 *   (√n/(4π) when absent, Sorkin–Yazdi 2018; or a fixed λ).
 * Untruncated = { none, false }; the usual double truncation = { sqrtN, true }.
 */
export const studyRuleSchema = z
  .strictObject({
    truncation: truncationRuleSchema,
    doubleTruncation: z.boolean().default(false),
    restrictedCut: restrictedCutSchema.optional(),
  })
  .refine((r) => r.restrictedCut === undefined || r.doubleTruncation === true, {
    message: 'a restricted cut applies only with double truncation',
    path: ['restrictedCut'],
  });
export type StudyRule = z.infer<typeof studyRuleSchema>;
export type StudyRuleInput = z.input<typeof studyRuleSchema>;

/**
 * Stable short key of a rule, used in exports and aggregate rows: "none", "sqrtN+double" (restricted cut
 * √n/(4π)), "sqrtN+double:lambda:0.2" (a fixed restricted cut), "lambda:0.5".
 */
export function studyRuleKey(rule: EntropyRuleSettings): string {
  const restricted = effectiveRestrictedCut(rule);
  const second = restricted === null ? '' : restricted.rule === 'sqrtN' ? '+double' : `+double:${formatRestrictedCut(restricted)}`;
  return `${formatTruncationRule(rule.truncation)}${second}`;
}

/** Human label of a rule for tables and legends (the same words as the run page). */
export function studyRuleLabel(rule: EntropyRuleSettings): string {
  return entropyRuleLabel(rule);
}

const fraction = z
  .number()
  .refine((v) => Number.isFinite(v) && v > 0 && v < 1, { message: 'ℓ/T must lie strictly between 0 and 1' });

const tipsDiamondSchema = z.strictObject({
  label: z.string().trim().min(1).max(40).optional(),
  past: eventSchema,
  future: eventSchema,
});

/** A subregion of an imported causal set given by its element labels (0-based, as in the file). */
const elementListSchema = z.strictObject({
  label: z.string().trim().min(1).max(40).optional(),
  indices: z
    .array(z.number().int({ message: 'element labels are whole numbers' }).min(0, { message: 'element labels start at 0' }))
    .min(2, { message: 'a subregion needs at least 2 elements' })
    .refine((i) => new Set(i).size === i.length, { message: 'each element may be listed once' }),
});

/**
 * Subregions, each a causal diamond or, on imported causal sets, a list of elements:
 * - `concentric`: sub-diamonds sharing the centre and axis of the region, with proper time ℓ = f·T for
 *   each fraction f = ℓ/T (2D diamonds, cylinder diamonds and 4D diamonds);
 * - `pairs`: two equal sub-diamonds of proper time ℓ = (ℓ/T)·T on the region's central slice, symmetric
 *   about its centre, a gap d = (d/T)·T between their facing corners, for the mutual information;
 * - `tips`: sub-diamonds given by their past and future tips;
 * - `elements`: element lists, for imported causal sets (the only choice for a relation list).
 */
export const studySubregionsSchema = z.discriminatedUnion('kind', [
  z.strictObject({
    kind: z.literal('concentric'),
    fractions: z
      .array(fraction)
      .min(1, { message: 'give at least one ℓ/T' })
      .max(12, { message: 'at most 12 sizes' })
      .refine((f) => new Set(f).size === f.length, { message: 'ℓ/T values must differ' }),
  }),
  z.strictObject({
    kind: z.literal('pairs'),
    /** proper time ℓ/T of each of the two equal sub-diamonds */
    sizes: z
      .array(fraction)
      .min(1, { message: 'give at least one ℓ/T' })
      .max(6, { message: 'at most 6 sizes' })
      .refine((f) => new Set(f).size === f.length, { message: 'ℓ/T values must differ' }),
    /** gap d/T between the facing corners of the two sub-diamonds, on the region's central slice */
    separations: z
      .array(z.number().refine((v) => Number.isFinite(v) && v > 0 && v < 1, { message: 'd/T must lie strictly between 0 and 1' }))
      .min(1, { message: 'give at least one d/T' })
      .max(12, { message: 'at most 12 separations' })
      .refine((d) => new Set(d).size === d.length, { message: 'd/T values must differ' }),
  }),
  z.strictObject({
    kind: z.literal('tips'),
    diamonds: z.array(tipsDiamondSchema).min(1, { message: 'give at least one sub-diamond' }).max(12, { message: 'at most 12 sub-diamonds' }),
  }),
  z.strictObject({
    kind: z.literal('elements'),
    lists: z
      .array(elementListSchema)
      .min(1, { message: 'give at least one element list' })
      .max(12, { message: 'at most 12 element lists' }),
  }),
]);
export type StudySubregions = z.infer<typeof studySubregionsSchema>;

const seedSchema = z.union([z.string().trim().min(1).max(200), z.number().int()]).transform(String);

const seedsSchema = z
  .array(seedSchema)
  .min(1, { message: 'give at least one seed' })
  .max(64, { message: 'at most 64 seeds' })
  .refine((s) => new Set(s).size === s.length, { message: 'seeds must differ' });

const countsSchema = z
  .array(z.number().int().min(20, { message: 'N must be at least 20' }))
  .min(1, { message: 'give at least one N' })
  .max(12, { message: 'at most 12 values of N' })
  .refine((c) => new Set(c).size === c.length, { message: 'N values must differ' });

/** Cut rules one study compares side by side: each is a column of every table and a curve of every plot. */
export const STUDY_MAX_RULES = 4;

const rulesSchema = z
  .array(studyRuleSchema)
  .min(1, { message: 'give at least one cut rule' })
  .max(STUDY_MAX_RULES, { message: `a study compares at most ${STUDY_MAX_RULES} cut rules; remove one` })
  .refine((r) => new Set(r.map((x) => studyRuleKey(x))).size === r.length, {
    message: 'cut rules must differ',
  });

const massSchema = z.number().refine((v) => Number.isFinite(v) && v >= 0, { message: 'mass must be ≥ 0' }).default(0);

/** A study over sprinklings of ours: one sprinkling per (N, seed). */
export const sprinkledStudyRequestSchema = z
  .strictObject({
    source: z.literal('sprinkled'),
    title: z.string().trim().max(200).optional(),
    region: regionSpecSchema.default({ kind: 'diamond2d', properTime: 2 }),
    process: z.enum(['fixed', 'poisson']).default('fixed'),
    prng: prngSchema.default('arc4'),
    /** element counts (fixed-N) or expected counts (Poisson), one sprinkling per count and seed */
    counts: countsSchema,
    seeds: seedsSchema,
    subregions: studySubregionsSchema,
    rules: rulesSchema,
    mass: massSchema,
    renyi: renyiOrdersSchema.optional(),
  })
  .refine((r) => r.subregions.kind !== 'elements', {
    message: 'element lists are for imported causal sets; give concentric sub-diamonds, pairs or tips for sprinklings',
    path: ['subregions', 'kind'],
  })
  .refine((r) => r.counts.length * r.seeds.length <= STUDY_MAX_CELLS, {
    message: `a study holds at most ${STUDY_MAX_CELLS} sprinklings (N values × seeds)`,
    path: ['seeds'],
  });

/**
 * A study over imported causal sets (shared/causalSets.ts): each set plays the part of one (N, seed)
 * sprinkling with its own N, so sets of equal N form the ensemble of that N.
 */
export const importedStudyRequestSchema = z.strictObject({
  source: z.literal('imported'),
  title: z.string().trim().max(200).optional(),
  causalSetIds: z
    .array(z.uuid({ message: 'not a causal set id' }))
    .min(1, { message: 'pick at least one causal set' })
    .max(STUDY_MAX_CELLS, { message: `a study holds at most ${STUDY_MAX_CELLS} causal sets` })
    .refine((ids) => new Set(ids.map((id) => id.toLowerCase())).size === ids.length, { message: 'each causal set may be picked once' }),
  subregions: studySubregionsSchema,
  rules: rulesSchema,
  mass: massSchema,
  renyi: renyiOrdersSchema.optional(),
});

const studyRequestUnion = z.discriminatedUnion('source', [sprinkledStudyRequestSchema, importedStudyRequestSchema]);

/**
 * Body of POST /api/studies: `source` "sprinkled" (the default when absent, as before imported sets
 * existed) or "imported".
 */
export const createStudyRequestSchema = z.preprocess(
  (body) => (body !== null && typeof body === 'object' && !Array.isArray(body) && !('source' in body) ? { ...body, source: 'sprinkled' } : body),
  studyRequestUnion,
);
export type CreateStudyRequest = z.infer<typeof studyRequestUnion>;
export type CreateStudyRequestInput = z.input<typeof studyRequestUnion>;
export type SprinkledStudyRequest = z.infer<typeof sprinkledStudyRequestSchema>;
export type ImportedStudyRequest = z.infer<typeof importedStudyRequestSchema>;
export type StudySource = CreateStudyRequest['source'];

/**
 * An imported causal set as a study keeps it: enough to name it in exports and to check the file
 * (SHA-256) against the one a reader has.
 */
export const studyCausalSetSchema = z.object({
  id: z.string(),
  name: z.string(),
  fileName: z.string(),
  checksum: z.string(),
  kind: z.enum(['coordinates', 'relations']),
  dimension: z.union([z.literal(2), z.literal(4)]),
  N: z.number().int(),
  region: regionSpecSchema.nullable(),
  density: z.number().nullable(),
});
export type StudyCausalSet = z.infer<typeof studyCausalSetSchema>;

/** A subregion as the worker and the exports see it: key, label, ℓ/T when concentric, tips. */
export const resolvedSubregionSchema = z.object({
  key: z.string(),
  label: z.string(),
  fraction: z.number().nullable(),
  /** tips of a sub-diamond; null for an element list */
  past: eventSchema.nullable(),
  future: eventSchema.nullable(),
  /** the element labels of an element-list subregion */
  elements: z.array(z.number().int()).optional(),
  /** a pair for the mutual information: the two sub-diamonds (past/future above are null), ℓ/T and d/T */
  pair: z
    .object({
      size: z.number(),
      separation: z.number(),
      a: z.object({ past: eventSchema, future: eventSchema }),
      b: z.object({ past: eventSchema, future: eventSchema }),
    })
    .optional(),
});
export type ResolvedSubregion = z.infer<typeof resolvedSubregionSchema>;

/** One computed entropy: one (N, seed, subregion, rule). The tidy CSV has one row per entry. */
export const studyEntropySchema = z.object({
  cellId: z.string(),
  /** the requested count; `elements` is the actual N (different for Poisson sprinklings) */
  N: z.number().int(),
  elements: z.number().int(),
  seed: z.string(),
  subregion: z.string(),
  fraction: z.number().nullable(),
  rule: z.string(),
  /** elements in the subregion */
  n: z.number().int(),
  S: z.number(),
  /** modes of the restricted iΔ kept (both signs) and the cut applied to them */
  modesKept: z.number().int(),
  cutoff: z.number(),
  /** positive modes of the whole region's iΔ kept and the whole-region cut */
  stateModesKept: z.number().int(),
  stateCutoff: z.number(),
  /** S_α by renyiKey, when the study asked for Rényi orders (not for pairs) */
  renyi: z.record(z.string(), z.number()).optional(),
  /** a pair row: S, n and renyi above are those of A∪B; I = S_A + S_B − S_{A∪B} */
  pair: z
    .object({
      size: z.number(),
      separation: z.number(),
      SA: z.number(),
      SB: z.number(),
      SAB: z.number(),
      I: z.number(),
      nA: z.number().int(),
      nB: z.number().int(),
      /** the Rényi mutual information I_α = S_α(A) + S_α(B) − S_α(A∪B), by renyiKey, when Rényi orders were asked */
      renyiI: z.record(z.string(), z.number()).optional(),
    })
    .optional(),
});
export type StudyEntropy = z.infer<typeof studyEntropySchema>;

const meanWithErrorSchema = z.object({ mean: z.number(), se: z.number().nullable() });

/** Ensemble over seeds for one (N, subregion, rule). */
export const studyAggregateSchema = z.object({
  N: z.number().int(),
  subregion: z.string(),
  fraction: z.number().nullable(),
  rule: z.string(),
  seeds: z.number().int(),
  meanElements: z.number(),
  meanN: z.number(),
  meanS: z.number(),
  /** sample standard deviation over seeds (n − 1 in the denominator); null for a single seed */
  sdS: z.number().nullable(),
  /** standard error of the mean, sdS/√seeds; null for a single seed */
  seS: z.number().nullable(),
  /** mean and standard error of each S_α over seeds, by renyiKey */
  renyi: z.record(z.string(), meanWithErrorSchema).optional(),
  /** a pair's mutual information over seeds */
  pair: z
    .object({
      size: z.number(),
      separation: z.number(),
      meanI: z.number(),
      sdI: z.number().nullable(),
      seI: z.number().nullable(),
      /** mean and standard error of each Rényi mutual information I_α, by renyiKey */
      renyiI: z.record(z.string(), meanWithErrorSchema).optional(),
    })
    .optional(),
});
export type StudyAggregate = z.infer<typeof studyAggregateSchema>;

/** Weighted least-squares straight line y = slope·x + intercept through the aggregates of one rule. */
export const studyFitSchema = z.object({
  rule: z.string(),
  /** null: over every aggregate of the rule; otherwise one subregion's aggregates across N */
  subregion: z.string().nullable(),
  /**
   * 'log': the quantity against ln √n (slope = b); 'linear': against n (the volume-law slope);
   * 'loglog': ln I against ln d (pairs; slope = the decay exponent)
   */
  model: z.enum(['log', 'linear', 'loglog']),
  /** what is fitted: "S" (absent on studies stored before Rényi orders), "renyi:2" (S_2, by renyiKey), "I" */
  quantity: z.string().optional(),
  /** pairs: the size ℓ/T whose separations were fitted */
  size: z.number().optional(),
  /** pairs: the N whose separations were fitted (a log-log fit is per rule, size and N) */
  N: z.number().int().optional(),
  /** pairs: separations left out of the log-log fit because their ⟨I⟩ ≤ 0 (no logarithm) */
  excluded: z.number().int().optional(),
  /**
   * pairs: the log-log slope of the continuum two-interval trend (1/3) ln[(ℓ+d)²/(d(2ℓ+d))] over the same
   * d/T values (server/engine/README.md §15), beside the measured slope, and the d/T range fitted
   */
  continuum: z.object({ slope: z.number(), from: z.number(), to: z.number() }).optional(),
  points: z.number().int(),
  slope: z.number(),
  slopeError: z.number().nullable(),
  intercept: z.number(),
  interceptError: z.number().nullable(),
  rSquared: z.number().nullable(),
  /** χ² per degree of freedom with the standard errors as σ; null when unweighted or too few points */
  reducedChiSquared: z.number().nullable(),
  /**
   * 'inverse-variance': weights 1/SE², errors from those σ (absolute); 'unweighted': some point has no
   * standard error (a single seed), errors from the scatter of the residuals
   */
  weighting: z.enum(['inverse-variance', 'unweighted']),
});
export type StudyFit = z.infer<typeof studyFitSchema>;

/** The quantity key of S_α in fits: "renyi:2", "renyi:inf". */
export const renyiQuantity = (key: string): string => `renyi:${key}`;

/** The S of a fit: fits stored before Rényi orders carry no quantity. */
export const fitQuantity = (fit: Pick<StudyFit, 'quantity'>): string => fit.quantity ?? 'S';

/** The renyiKey of each order of a request, ascending with ∞ last (empty without orders). */
export function studyRenyiKeys(request: { renyi?: RenyiOrder[] }): string[] {
  return request.renyi ? sortedRenyiOrders(request.renyi).map(renyiKey) : [];
}

/**
 * renyiKeys ascending with "inf" last. Objects keyed by them cannot keep an order ("2" is an integer key,
 * which JavaScript lists first, and jsonb reorders keys), so every list of them goes through this.
 */
export function sortRenyiKeys(keys: Iterable<string>): string[] {
  const value = (k: string) => (k === 'inf' ? Number.POSITIVE_INFINITY : Number(k));
  return [...new Set(keys)].sort((p, q) => value(p) - value(q));
}

const short = (v: number, digits = 3) => String(Number(v.toPrecision(digits)));

/**
 * The sentence that states a log-log fit of I against d beside the continuum trend, as the study page,
 * the LaTeX caption and the methods paragraph give it: "measured slope −1.12 ± 0.15 against continuum
 * trend −0.87 over d/T ∈ [0.05, 0.2] (4 points)".
 */
export function pairDecaySentence(fit: Pick<StudyFit, 'slope' | 'slopeError' | 'continuum' | 'points' | 'excluded'>): string {
  const measured = `measured slope ${formatWithError(fit.slope, fit.slopeError, 'text', 'fit')}`;
  const trend = fit.continuum ? ` against continuum trend ${formatQuantity(fit.continuum.slope, 'fit')} over d/T ∈ [${short(fit.continuum.from)}, ${short(fit.continuum.to)}]` : '';
  const left = fit.excluded ? `; ${fit.excluded} separation${fit.excluded === 1 ? '' : 's'} with ⟨I⟩ ≤ 0 left out` : '';
  return `${measured}${trend} (${fit.points} points${left})`;
}

export const studyCellSchema = z.object({
  id: z.string(),
  N: z.number().int(),
  seed: z.string(),
  status: cellStatusSchema,
  percent: z.number(),
  elements: z.number().int().nullable(),
  error: z.string().nullable(),
  seconds: z.number().nullable(),
});
export type StudyCell = z.infer<typeof studyCellSchema>;

/** One row of the studies table. */
export const studySummarySchema = z.object({
  id: z.string(),
  title: z.string().nullable(),
  status: studyStatusSchema,
  author: z.object({ id: z.string(), name: z.string() }),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  /** sprinklings of ours, or imported causal sets standing in for them */
  source: z.enum(['sprinkled', 'imported']),
  /** the region kind, or "imported" */
  regionKind: z.string(),
  /** distinct N values (for an imported study, those of its sets) */
  counts: z.array(z.number().int()),
  /** seeds per N; for an imported study the number of causal sets */
  seedCount: z.number().int(),
  rules: z.array(z.string()),
  subregionCount: z.number().int(),
  progress: z.object({
    /** cells (sprinklings) finished, of `total` */
    done: z.number().int(),
    failed: z.number().int(),
    cancelled: z.number().int(),
    total: z.number().int(),
    /** 0..100 including the share of the cells still computing */
    percent: z.number(),
  }),
  /** elapsed time, an estimate of the time left (from the finished cells) and the queue position of the next waiting cell */
  timing: computeTimingSchema,
});
export type StudySummary = z.infer<typeof studySummarySchema>;

export const studyListResponseSchema = z.object({ items: z.array(studySummarySchema) });

/** Positive eigenvalues of iΔ of one sprinkling per N (the first seed that finished), for the spectra plot. */
export const studySpectrumSchema = z.object({
  N: z.number().int(),
  seed: z.string(),
  elements: z.number().int(),
  eigenvalues: z.array(z.number()),
  /** whole-region cut of each rule that cuts the state, e.g. √N/(4π) */
  cuts: z.array(z.object({ rule: z.string(), cutoff: z.number() })),
});
export type StudySpectrum = z.infer<typeof studySpectrumSchema>;

/** GET /api/studies/:id */
export const studyDetailSchema = studySummarySchema.extend({
  /** the validated request */
  request: z.unknown(),
  error: z.string().nullable(),
  cancelRequested: z.boolean(),
  subregions: z.array(resolvedSubregionSchema),
  /** the imported causal sets of an imported study, in cell order (a cell's seed is the set's id); empty otherwise */
  causalSets: z.array(studyCausalSetSchema),
  ruleLabels: z.record(z.string(), z.string()),
  /** cautions for the study's rules on its dimension (e.g. a 2D cut on 4D regions), to show beside the results */
  cautions: z.array(z.string()),
  cells: z.array(studyCellSchema),
  aggregates: z.array(studyAggregateSchema),
  fits: z.array(studyFitSchema),
  spectra: z.array(studySpectrumSchema),
  engineVersion: z.string().nullable(),
  backends: z.array(z.string()),
});
export type StudyDetail = z.infer<typeof studyDetailSchema>;

// ---- the daily loop: list filters, extending, retrying, a cell as a run ----

/** A blank query parameter (`?status=`) means no filter, as an untouched select sends it. */
const blankAsAbsent = (value: unknown) => (value === '' ? undefined : value);

const dayText = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, { message: 'a date is written YYYY-MM-DD' })
  .refine((d) => !Number.isNaN(Date.parse(`${d}T00:00:00Z`)) && new Date(`${d}T00:00:00Z`).toISOString().startsWith(d), { message: 'not a calendar date' });

/** Query of GET /api/studies: every filter optional; dates are whole days (UTC), both ends included. */
export const listStudiesQuerySchema = z
  .strictObject({
    /** words of the title (or the first characters of the id) */
    search: z.preprocess(blankAsAbsent, z.string().trim().max(200, { message: 'search for at most 200 characters' }).optional()),
    status: z.preprocess(blankAsAbsent, studyStatusSchema.optional()),
    regionKind: z.preprocess(blankAsAbsent, z.enum([...regionKinds, 'imported'], { message: `the region kind is one of ${[...regionKinds, 'imported'].join(', ')}` }).optional()),
    authorId: z.preprocess(blankAsAbsent, z.uuid({ message: 'not a user id' }).optional()),
    createdFrom: z.preprocess(blankAsAbsent, dayText.optional()),
    createdTo: z.preprocess(blankAsAbsent, dayText.optional()),
  })
  .refine((q) => !q.createdFrom || !q.createdTo || q.createdFrom <= q.createdTo, {
    message: 'the first day comes after the last one',
    path: ['createdTo'],
  });
export type ListStudiesQuery = z.infer<typeof listStudiesQuerySchema>;

/** Seeds "<prefix>-1" … "<prefix>-k": readable in exports, distinct, reproducible (the study form's rule). */
export function numberedSeeds(prefix: string, count: number, from = 1): string[] {
  const base = prefix.trim() || 'seed';
  return Array.from({ length: Math.max(0, Math.floor(count)) }, (_, k) => `${base}-${from + k}`);
}

/**
 * The prefix and count of seeds that follow the numbered rule exactly (prefix-1 … prefix-k, in that
 * order), or null for seeds named otherwise.
 */
export function numberedSeedRule(seeds: readonly string[]): { prefix: string; count: number } | null {
  const first = /^(.*)-1$/.exec(seeds[0] ?? '');
  if (!first) return null;
  const prefix = first[1]!;
  return seeds.every((s, k) => s === `${prefix}-${k + 1}`) ? { prefix, count: seeds.length } : null;
}

/**
 * `count` more seeds for a study: by the numbered rule, continuing after the highest number of the
 * prefix its seeds use (the last numbered seed's prefix; "seed" when none is numbered), skipping any
 * name it already has.
 */
export function nextSeeds(existing: readonly string[], count: number): string[] {
  const numbered = existing.map((s) => /^(.*)-(\d+)$/.exec(s)).filter((m): m is RegExpExecArray => m !== null);
  const prefix = numbered.length > 0 ? numbered[numbered.length - 1]![1]! : 'seed';
  let next = 1 + Math.max(0, ...numbered.filter((m) => m[1] === prefix).map((m) => Number(m[2])));
  const taken = new Set(existing);
  const out: string[] = [];
  while (out.length < count) {
    const seed = `${prefix}-${next++}`;
    if (!taken.has(seed)) out.push(seed);
  }
  return out;
}

/**
 * Body of POST /api/studies/:id/extend: more N values and/or more seeds for a study over sprinklings.
 * Seeds are given by name (`seeds`) or by number (`seedCount`, named by nextSeeds). Every (N, seed) of
 * the grown grid that the study lacks becomes a cell; existing cells stay as they are.
 */
export const extendStudyRequestSchema = z
  .strictObject({
    counts: z
      .array(z.number().int().min(20, { message: 'N must be at least 20' }))
      .max(12, { message: 'at most 12 values of N' })
      .refine((c) => new Set(c).size === c.length, { message: 'N values must differ' })
      .default([]),
    seeds: z
      .array(seedSchema)
      .max(64, { message: 'at most 64 seeds' })
      .refine((s) => new Set(s).size === s.length, { message: 'seeds must differ' })
      .optional(),
    seedCount: z.number().int({ message: 'the number of seeds is a whole number' }).min(1, { message: 'add at least one seed' }).max(64, { message: 'at most 64 seeds' }).optional(),
  })
  .refine((r) => r.seeds === undefined || r.seedCount === undefined, { message: 'give the new seeds by name or by number, not both', path: ['seedCount'] })
  .refine((r) => r.counts.length > 0 || (r.seeds?.length ?? 0) > 0 || r.seedCount !== undefined, {
    message: 'give more N values or more seeds',
    path: ['counts'],
  });
export type ExtendStudyRequest = z.infer<typeof extendStudyRequestSchema>;
export type ExtendStudyRequestInput = z.input<typeof extendStudyRequestSchema>;

/** Answer of extend and retry: the cells queued. */
export const queuedCellsResponseSchema = z.object({ cellIds: z.array(z.string()) });

/** Body of POST /api/studies/:id/cells/:cellId/run: which subregion and rule of the cell the run computes (their keys). */
export const studyCellRunRequestSchema = z.strictObject({
  subregion: z.string().min(1, { message: 'name the subregion by its key' }),
  rule: z.string().min(1, { message: 'name the cut rule by its key' }),
});
export type StudyCellRunRequest = z.infer<typeof studyCellRunRequestSchema>;
