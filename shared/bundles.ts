import { z } from 'zod';
import { eventSchema, regionSpecSchema } from './regions';
import { ENTROPY_FLOOR } from './precision';
import { restrictedCutSchema, truncationRuleSchema } from './vacuum';

/**
 * Supplementary bundles: one zip of a study (GET /api/studies/:id/bundle) or of chosen runs
 * (POST /api/bundles) with every sprinkling's points, spectra, tables, figures, methods and BibTeX, and
 * `manifest.json`. The manifest is what `tacet reproduce BUNDLE.zip` checks: each file's SHA-256, and
 * each entropy with everything needed to compute it again from the bundle's points alone.
 */

/** Runs one POST /api/bundles may hold: a paper's worth, bounded so one request stays a few minutes of work. */
export const BUNDLE_MAX_RUNS = 100;

/** Body of POST /api/bundles. */
export const createRunBundleRequestSchema = z.strictObject({
  runIds: z
    .array(z.uuid({ message: 'not a run id' }))
    .min(1, { message: 'pick at least one run' })
    .max(BUNDLE_MAX_RUNS, { message: `a bundle holds at most ${BUNDLE_MAX_RUNS} runs` })
    .refine((ids) => new Set(ids.map((id) => id.toLowerCase())).size === ids.length, { message: 'each run may be picked once' }),
});
export type CreateRunBundleRequest = z.infer<typeof createRunBundleRequestSchema>;

/** The header that tells a client how many files the zip will hold, so it can show progress. */
export const bundleFileCountHeader = 'x-tacet-bundle-files';

const tipsSchema = z.object({ past: eventSchema, future: eventSchema });
const elementListSchema = z.object({ elements: z.array(z.number().int().min(0)).min(2) });

/**
 * The subregion of one entropy: a sub-diamond by its tips, a list of element labels (0-based rows of
 * the points file), or a pair A, B of either whose union's S is the entry's S.
 */
export const bundleSubregionSchema = z.union([
  tipsSchema,
  elementListSchema,
  z.object({ pair: z.object({ a: z.union([tipsSchema, elementListSchema]), b: z.union([tipsSchema, elementListSchema]) }) }),
]);
export type BundleSubregion = z.infer<typeof bundleSubregionSchema>;

/** The rule an entropy was computed under: the whole-region truncation and, with double truncation, the restricted cut. */
export const bundleRuleSchema = z.object({
  truncation: truncationRuleSchema,
  doubleTruncation: z.boolean(),
  /** absent with double truncation: √n/(4π) */
  restrictedCut: restrictedCutSchema.optional(),
});

/** One entropy of the bundle and how to compute it again. */
export const bundleEntropySchema = z.object({
  /** where it came from: a study cell or a run, by id */
  source: z.object({ kind: z.enum(['study-cell', 'run']), id: z.string() }),
  /** the path in the zip of the elements: `t,x[,y,z]` coordinates, or `i,j` rows of the closed relation */
  points: z.string(),
  format: z.enum(['coordinates', 'relations']),
  dimension: z.union([z.literal(2), z.literal(4)]),
  /** the sprinkling's seed; null for an imported causal set or a re-analysis */
  seed: z.string().nullable(),
  /** elements of the causal set */
  N: z.number().int(),
  /** the region the elements lie in (its periodic x and volume matter), null when not known */
  region: regionSpecSchema.nullable(),
  /** ρ as the computation used it (a Poisson sprinkling's is the expected count over V, not N/V) */
  density: z.number().nullable(),
  mass: z.number(),
  engine: z.enum(['dense', 'structured']),
  /** the rule's key, as tables and exports name it */
  ruleKey: z.string(),
  rule: bundleRuleSchema,
  subregion: bundleSubregionSchema,
  /** the subregion's key in the study (e.g. `l/L=0.5`); for a run, `run` */
  subregionKey: z.string(),
  /** elements in the subregion (A∪B for a pair) */
  n: z.number().int(),
  S: z.number(),
  /** a pair's parts: S_A, S_B and I = S_A + S_B − S_{A∪B} */
  pair: z.object({ SA: z.number(), SB: z.number(), I: z.number() }).optional(),
});
export type BundleEntropy = z.infer<typeof bundleEntropySchema>;

export const bundleManifestSchema = z.object({
  /** the manifest's own format */
  format: z.literal('tacet-bundle/1'),
  kind: z.enum(['study', 'runs']),
  /** the study's id, or the runs' ids */
  ids: z.array(z.string()),
  createdAt: z.string(),
  engineVersion: z.string(),
  /** every other file of the zip: path → SHA-256 (hex) */
  files: z.record(z.string(), z.string().regex(/^[0-9a-f]{64}$/)),
  entropies: z.array(bundleEntropySchema),
});
export type BundleManifest = z.infer<typeof bundleManifestSchema>;

/** What `tacet reproduce --json` prints. */
export const reproduceReportSchema = z.object({
  /** entropies (and pair parts) computed again and compared */
  checked: z.number().int(),
  /** the largest |S′ − S| / max(|S|, ENTROPY_FLOOR) */
  maxRelDiff: z.number(),
  ok: z.boolean(),
  /** the entries outside the tolerance, by index in manifest.entropies */
  mismatches: z.array(z.object({ entry: z.number().int(), quantity: z.string(), stored: z.number(), recomputed: z.number() })),
});
export type ReproduceReport = z.infer<typeof reproduceReportSchema>;

/**
 * A recomputed entropy agrees when |S′ − S| ≤ REPRODUCE_RELATIVE_TOLERANCE·|S| + ENTROPY_FLOOR: the
 * same engine on the same points differs only by rounding (another BLAS thread count sums in another
 * order, about 1e-13 relative; an untruncated S carries about 1e-7, server/engine/README.md §6), and a
 * pure state's S is zero only to the numerical floor of shared/precision.ts.
 */
export const REPRODUCE_RELATIVE_TOLERANCE = 1e-6;

export function entropiesAgree(stored: number, recomputed: number): boolean {
  return Math.abs(recomputed - stored) <= REPRODUCE_RELATIVE_TOLERANCE * Math.abs(stored) + ENTROPY_FLOOR;
}

export function relativeDifference(stored: number, recomputed: number): number {
  return Math.abs(recomputed - stored) / Math.max(Math.abs(stored), ENTROPY_FLOOR);
}
