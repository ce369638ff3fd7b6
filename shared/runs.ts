import { z } from 'zod';
import { computeTimingSchema } from './computeTiming';
import { manifoldLikenessSchema } from './manifoldLikeness';
import { regionKinds } from './regions';
import {
  engineRequestSchema,
  renyiOrdersSchema,
  restrictedCutSchema,
  sprinklingSpecSchema,
  subregionPairSchema,
  subregionSpecSchema,
  truncationRuleSchema,
  vacuumSettingsSchema,
  vacuumStages,
} from './vacuum';

/**
 * Vacuum runs: one computation of the SJ state (and optionally a subregion's entropy) on one causal set.
 * Shared by the run form, the API and the worker, so a request validates alike everywhere.
 */

export const runStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export const runStatusSchema = z.enum(runStatuses);
export type RunStatus = z.infer<typeof runStatusSchema>;

export const runStageSchema = z.enum(vacuumStages);

/**
 * Body of POST /api/runs. Either `sprinkling` (region, fixed or Poisson, count or density, seed) or,
 * once imported causal sets exist, `causalSetId`. Field settings sit beside it.
 */
export const createRunRequestSchema = vacuumSettingsSchema
  .extend({
    title: z.string().trim().max(200).optional(),
    sprinkling: sprinklingSpecSchema.optional(),
    causalSetId: z.uuid().optional(),
  })
  .refine((r) => (r.sprinkling === undefined) !== (r.causalSetId === undefined), {
    message: 'give exactly one of sprinkling and causalSetId',
    path: ['sprinkling'],
  });
export type CreateRunRequest = z.infer<typeof createRunRequestSchema>;
export type CreateRunRequestInput = z.input<typeof createRunRequestSchema>;

/** Body of POST /api/runs/:id/reanalyse: the same points, other settings, as a new run. */
export const reanalyseRunRequestSchema = z.strictObject({
  title: z.string().trim().max(200).optional(),
  mass: z.number().min(0).optional(),
  truncation: truncationRuleSchema.optional(),
  subregion: subregionSpecSchema.nullable().optional(),
  doubleTruncation: z.boolean().optional(),
  /** the second cut of double truncation; carries over from the parent when absent, null for the default √n/(4π) */
  restrictedCut: restrictedCutSchema.nullable().optional(),
  /** the parent's engine request carries over when absent; auto lets the rule pick for the new cut */
  engine: engineRequestSchema.optional(),
  /** Rényi orders; the parent's carry over (with a subregion) when absent, null asks for none */
  renyi: renyiOrdersSchema.nullable().optional(),
  /** the pair for I(A:B); the parent's carries over when absent, null drops it */
  mutualInformation: subregionPairSchema.nullable().optional(),
  /** the complement check; the parent's carries over (with a subregion) when absent */
  complement: z.boolean().optional(),
});
export type ReanalyseRunRequest = z.infer<typeof reanalyseRunRequestSchema>;

/** Answer of POST /api/runs/:id/reseed: the new run and the seed it sprinkles from. */
export const reseededRunSchema = z.object({ id: z.string(), seed: z.string() });

export const runSortFields = ['createdAt', 'N', 'S', 'status'] as const;

/** Query of GET /api/runs. */
export const listRunsQuerySchema = z.strictObject({
  status: runStatusSchema.optional(),
  regionKind: z.enum([...regionKinds, 'imported']).optional(),
  authorId: z.uuid().optional(),
  search: z.string().trim().max(200).optional(),
  sort: z.enum(runSortFields).default('createdAt'),
  order: z.enum(['asc', 'desc']).default('desc'),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});
export type ListRunsQuery = z.infer<typeof listRunsQuerySchema>;

/** One row of the runs table. */
export const runSummarySchema = z.object({
  id: z.string(),
  title: z.string().nullable(),
  status: runStatusSchema,
  stage: runStageSchema.nullable(),
  /** 0..100 over all stages */
  percent: z.number(),
  author: z.object({ id: z.string(), name: z.string() }),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  dimension: z.union([z.literal(2), z.literal(4)]),
  regionKind: z.string(),
  /** elements: the requested count until sprinkled, then the actual N */
  N: z.number().int().nullable(),
  /** short text form of the truncation rule, e.g. "sqrtN" or "lambda:0.5" */
  truncation: z.string(),
  /** short text form of the restricted cut of double truncation ("sqrtN" for √n/(4π), "lambda:0.2"); null without double truncation */
  restrictedCut: z.string().nullable(),
  /** entropy of the subregion when one was asked and the run is done */
  S: z.number().nullable(),
  parentRunId: z.string().nullable(),
  /** the failed or cancelled run this one retries (POST /api/runs/:id/retry), else null */
  retryOfRunId: z.string().nullable(),
  /** elapsed time, an estimate of the time left and the queue position */
  timing: computeTimingSchema,
});
export type RunSummary = z.infer<typeof runSummarySchema>;

export const runListResponseSchema = z.object({
  items: z.array(runSummarySchema),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});

export const runDiagnosticsSchema = z.object({
  hermiticity: z.number(),
  minEigenvalueW: z.number(),
  commutatorResidual: z.number(),
  positiveNegativeOverlap: z.number(),
  trace: z.number(),
}).catchall(z.unknown());

/** One entropy beside the main one (A, B, A∪B of a pair; the causal complement): its value, size and cut. */
export const entropyPartSchema = z.object({
  S: z.number(),
  n: z.number().int(),
  modesKept: z.number().int(),
  cutoff: z.number(),
  restrictedCut: restrictedCutSchema.nullable().optional(),
});
export type EntropyPart = z.infer<typeof entropyPartSchema>;

/** `result` of GET /api/runs/:id once the run is done. */
export const runResultSchema = z.object({
  N: z.number().int(),
  density: z.number().nullable(),
  volume: z.number().nullable(),
  relations: z.number().int(),
  links: z.number().int().nullable(),
  /** the positive eigenvalues of iΔ, descending: all of them (dense engine) or only those computed above the cut (structured) */
  eigenvalues: z.array(z.number()),
  /** continuum values N/(4x_k) for each rank, 2D diamonds only */
  continuum: z.array(z.number()).nullable(),
  cutoff: z.number(),
  modesKept: z.number().int(),
  /** the knee finder's fit (truncation knee only, see server/engine/truncation.ts findKnee); null otherwise */
  knee: z
    .object({
      /** the law of the kept modes, λ_k ≈ amplitude · k^(−exponent) */
      amplitude: z.number(),
      exponent: z.number(),
      /** β of the departure term fitted beside the law (absent on runs stored before it existed) */
      curvature: z.number().optional(),
      fitWindow: z.number().int(),
      tolerance: z.number(),
      /** modes kept at half (low) and 1.5 times (high) the tolerance (absent on runs stored before it existed) */
      rankRange: z.object({ low: z.number().int(), high: z.number().int(), lowTolerance: z.number(), highTolerance: z.number() }).optional(),
    })
    .nullable(),
  diagnostics: runDiagnosticsSchema,
  entropy: z
    .object({
      S: z.number(),
      n: z.number().int(),
      modesKept: z.number().int(),
      /** |λ| of the restricted iΔ at or below which modes were dropped */
      cutoff: z.number().optional(),
      doubleTruncation: z.boolean().optional(),
      /** the second cut of double truncation; null without it */
      restrictedCut: restrictedCutSchema.nullable().optional(),
      generalizedEigenvalues: z.array(z.number()),
      /** S_α by renyiKey ("0.5", "2", "inf"), when the run asked for Rényi orders */
      renyi: z.record(z.string(), z.number()).nullable().optional(),
    })
    .nullable(),
  /** I(A:B) = S_A + S_B − S_{A∪B} and its three entropies, when the run asked for a pair */
  mutualInformation: z
    .object({
      I: z.number(),
      a: entropyPartSchema,
      b: entropyPartSchema,
      union: entropyPartSchema,
    })
    .nullable()
    .optional(),
  /** the entropy of the subregion's causal complement O′ and S_O′ − S_O, when asked (a purity check) */
  complement: entropyPartSchema.extend({ difference: z.number() }).nullable().optional(),
  /** counts and dimension estimators of the run's causal set (server/engine/README.md §16); null when not computed */
  manifold: manifoldLikenessSchema.nullable().optional(),
  /** cautions for the rule on this dimension (e.g. a 2D cut on a 4D region), to show beside the result */
  cautions: z.array(z.string()).optional(),
  backend: z.string(),
  engineVersion: z.string(),
  /** seconds per stage */
  timings: z.record(z.string(), z.number()),
  /** which engine ran (absent for runs stored before the structured engine existed) */
  engine: z.enum(['dense', 'structured']).optional(),
  /** why the rule picked it, in one sentence */
  engineReason: z.string().optional(),
});
export type RunResult = z.infer<typeof runResultSchema>;

/** GET /api/runs/:id */
export const runDetailSchema = runSummarySchema.extend({
  /** the validated request the run was made from (a re-analysis shows its own settings) */
  request: z.unknown(),
  error: z.string().nullable(),
  cancelRequested: z.boolean(),
  result: runResultSchema.nullable(),
});
export type RunDetail = z.infer<typeof runDetailSchema>;

/**
 * Where a run came from when it was opened from a cell of a scaling study: kept in the run's stored
 * request as `origin`, so its page can say "from study …, cell …" and link back.
 */
export const runOriginSchema = z.object({
  kind: z.literal('study-cell'),
  studyId: z.string(),
  studyTitle: z.string().nullable(),
  cellId: z.string(),
  N: z.number().int(),
  seed: z.string(),
  /** the subregion's key and label in the study */
  subregion: z.string(),
  subregionLabel: z.string(),
  /** the cut rule's key in the study */
  rule: z.string(),
});
export type RunOrigin = z.infer<typeof runOriginSchema>;

/** The origin in a run's stored request (`RunDetail.request`), or null for a run made otherwise. */
export function runOriginOf(request: unknown): RunOrigin | null {
  const origin = request !== null && typeof request === 'object' ? (request as { origin?: unknown }).origin : undefined;
  const parsed = runOriginSchema.safeParse(origin);
  return parsed.success ? parsed.data : null;
}

/** The words of a run's origin: "from study Area law (3f2a19c0), cell N = 200, seed seed-2". */
export function runOriginText(origin: RunOrigin): string {
  const study = origin.studyTitle ? `${origin.studyTitle} (${origin.studyId.slice(0, 8)})` : origin.studyId.slice(0, 8);
  return `from study ${study}, cell N = ${origin.N}, seed ${origin.seed}`;
}

/** GET /api/runs/:id/points — for the scatter plot. */
export const runPointsSchema = z.object({
  dimension: z.union([z.literal(2), z.literal(4)]),
  columns: z.array(z.string()),
  /** one row per element, in element order */
  points: z.array(z.array(z.number())),
  /** element labels inside the subregion, when one was asked */
  subregionElements: z.array(z.number().int()).nullable(),
  /** element labels inside A and inside B, when the run asked for a pair (absent on older servers) */
  pairElements: z.object({ a: z.array(z.number().int()), b: z.array(z.number().int()) }).nullable().optional(),
});
export type RunPoints = z.infer<typeof runPointsSchema>;

/** Saved truncation presets of a team ("cut rules"). */
export const createCutRuleRequestSchema = z.strictObject({
  name: z.string().trim().min(1).max(80),
  rule: truncationRuleSchema,
  note: z.string().trim().max(500).optional(),
});
export const cutRuleSchema = z.object({
  id: z.string(),
  name: z.string(),
  rule: truncationRuleSchema,
  note: z.string().nullable(),
  createdBy: z.object({ id: z.string(), name: z.string() }),
  createdAt: z.string(),
});
export type CutRule = z.infer<typeof cutRuleSchema>;
