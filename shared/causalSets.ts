import { z } from 'zod';
import { manifoldLikenessSchema } from './manifoldLikeness';
import { regionSpecSchema, regionText, type RegionSpec } from './regions';

/**
 * Imported causal sets: sprinklings or orders made by other generators and uploaded as a file, then used
 * by runs in place of a sprinkling of ours. Two file kinds:
 * - `coordinates`: CSV with the header `t,x` (2D) or `t,x,y,z` (4D Minkowski), one element per row;
 *   the region the points were drawn in (so its volume is known) or the density ρ goes with it;
 * - `relations`: one pair `i,j` per row meaning element i precedes element j (labels 0..count−1), an
 *   optional header `i,j`; the element count and the dimension go with it, the density for a massive
 *   field or 4D. The relation is transitively closed on import and must be acyclic.
 * Conventions (units c = 1, element labels, ≺) follow server/engine/README.md §1.
 */

export const causalSetKinds = ['coordinates', 'relations'] as const;
export const causalSetKindSchema = z.enum(causalSetKinds);
export type CausalSetKind = z.infer<typeof causalSetKindSchema>;

export const causalSetDimensionSchema = z.union([z.literal(2), z.literal(4)], {
  message: 'dimension must be 2 or 4',
});

/** Largest upload accepted, in bytes; a full relation of 3000 elements in 2D is about 20 MB as text. */
export const CAUSAL_SET_FILE_LIMIT_BYTES = 32 * 1024 * 1024;

const positiveFinite = z
  .number({ message: 'must be a number' })
  .refine(Number.isFinite, { message: 'must be a finite number' })
  .refine((v) => v > 0, { message: 'must be positive' });

/** What goes with an uploaded file (the file itself is the multipart field `file`). */
export const causalSetMetadataSchema = z
  .strictObject({
    name: z.string().trim().min(1, { message: 'give the causal set a name' }).max(200),
    kind: causalSetKindSchema,
    /** coordinates: checked against the header; relations: required */
    dimension: causalSetDimensionSchema.optional(),
    /** coordinates only: the region the points lie in; ρ = N/V */
    region: regionSpecSchema.optional(),
    /** ρ, elements per unit spacetime volume */
    density: positiveFinite.optional(),
    /** relations only: the number of elements, labelled 0..count−1 */
    count: z.number({ message: 'must be a whole number' }).int({ message: 'must be a whole number' }).min(2, { message: 'a causal set needs at least 2 elements' }).optional(),
  })
  .superRefine((m, ctx) => {
    if (m.kind === 'coordinates') {
      if ((m.region === undefined) === (m.density === undefined)) {
        ctx.addIssue({ code: 'custom', path: ['region'], message: 'give either the region the points lie in or the density, not both' });
      }
      if (m.count !== undefined) {
        ctx.addIssue({ code: 'custom', path: ['count'], message: 'a coordinates file gives its own element count (one element per row)' });
      }
    } else {
      if (m.count === undefined) ctx.addIssue({ code: 'custom', path: ['count'], message: 'a relation list needs the element count' });
      if (m.dimension === undefined) ctx.addIssue({ code: 'custom', path: ['dimension'], message: 'a relation list needs the dimension (2 or 4)' });
      if (m.region !== undefined) {
        ctx.addIssue({ code: 'custom', path: ['region'], message: 'a relation list has no coordinates to place in a region; give the density instead' });
      }
    }
  });
export type CausalSetMetadata = z.infer<typeof causalSetMetadataSchema>;

/**
 * Multipart form fields are text: `region` is JSON, `dimension`, `density` and `count` are numbers.
 * Empty fields count as absent. Returns the object to validate with causalSetMetadataSchema.
 */
export function metadataFromFormFields(fields: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, raw] of Object.entries(fields)) {
    if (raw === undefined) continue;
    const text = typeof raw === 'string' ? raw.trim() : raw;
    if (text === '') continue;
    if (typeof text !== 'string') {
      out[key] = text;
    } else if (key === 'region') {
      try {
        out[key] = JSON.parse(text);
      } catch {
        out[key] = text; // the schema then says what a region must look like
      }
    } else if (key === 'dimension' || key === 'density' || key === 'count') {
      out[key] = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(text) ? Number(text) : text;
    } else {
      out[key] = text;
    }
  }
  return out;
}

/** Form fields for an upload, the inverse of metadataFromFormFields (used by the client). */
export function metadataToFormFields(metadata: CausalSetMetadata): Record<string, string> {
  const fields: Record<string, string> = { name: metadata.name, kind: metadata.kind };
  if (metadata.dimension !== undefined) fields.dimension = String(metadata.dimension);
  if (metadata.region !== undefined) fields.region = JSON.stringify(metadata.region);
  if (metadata.density !== undefined) fields.density = String(metadata.density);
  if (metadata.count !== undefined) fields.count = String(metadata.count);
  return fields;
}

/**
 * Order statistics computed on import. The ordering fraction is R / (N choose 2) with R the number of
 * related pairs (Myrheim 1978: for a sprinkling into a 2D diamond it tends to 1/2); the height is the
 * number of elements in a longest chain.
 */
export const causalSetStatsSchema = z.object({
  relations: z.number().int(),
  links: z.number().int(),
  orderingFraction: z.number(),
  height: z.number().int(),
  /** elements with nothing to their past / future */
  minimal: z.number().int(),
  maximal: z.number().int(),
  /** counts and dimension estimators (absent on sets imported before they existed) */
  manifold: manifoldLikenessSchema.optional(),
});
export type CausalSetStats = z.infer<typeof causalSetStatsSchema>;

/** One row of the causal sets table. */
export const causalSetSummarySchema = z.object({
  id: z.string(),
  name: z.string(),
  kind: causalSetKindSchema,
  dimension: causalSetDimensionSchema,
  N: z.number().int(),
  region: regionSpecSchema.nullable(),
  /** ρ as given, or N/V from the region; null for a relation list without a density */
  density: z.number().nullable(),
  volume: z.number().nullable(),
  fileName: z.string(),
  fileBytes: z.number().int(),
  /** SHA-256 of the uploaded bytes, hex */
  checksum: z.string(),
  stats: causalSetStatsSchema,
  /** what to know before running on it, e.g. a declared dimension its order disagrees with (shared/manifoldLikeness.ts) */
  warnings: z.array(z.string()),
  createdBy: z.object({ id: z.string(), name: z.string() }),
  createdAt: z.string(),
});
export type CausalSetSummary = z.infer<typeof causalSetSummarySchema>;

export const causalSetLimitsSchema = z.object({
  /** the engine's dense size limit */
  maxElements: z.number().int(),
  maxFileBytes: z.number().int(),
});
export type CausalSetLimits = z.infer<typeof causalSetLimitsSchema>;

/** GET /api/causal-sets */
export const causalSetListResponseSchema = z.object({
  items: z.array(causalSetSummarySchema),
  limits: causalSetLimitsSchema,
});
export type CausalSetListResponse = z.infer<typeof causalSetListResponseSchema>;

/** GET /api/causal-sets/:id — the summary and what the preview page draws. */
export const causalSetDetailSchema = causalSetSummarySchema.extend({
  preview: z.discriminatedUnion('kind', [
    z.object({
      kind: z.literal('coordinates'),
      columns: z.array(z.string()),
      /** one row per element, in element order */
      points: z.array(z.array(z.number())),
    }),
    z.object({
      kind: z.literal('relations'),
      /** number of elements in each layer by longest chain from below (layer 1 = minimal elements) */
      layerSizes: z.array(z.number().int()),
    }),
  ]),
});
export type CausalSetDetail = z.infer<typeof causalSetDetailSchema>;

/** Short text for a region, e.g. "2D diamond, T = 2" (tables and the preview page). */
export function describeRegion(region: RegionSpec | null): string {
  return region ? regionText(region) : '—';
}
