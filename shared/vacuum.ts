import { z } from 'zod';

/**
 * Request vocabulary of a vacuum computation on a causal set: regions, sprinklings, truncation rules and
 * subregions. Used by the command-line tool, the run form and the API, so a setting means the same thing
 * everywhere. Conventions (units c = 1, coordinate order t, x[, y, z]) follow shared physics notes §1.
 */

const finite = z.number({ message: 'must be a number' }).refine(Number.isFinite, { message: 'must be a finite number' });
const positive = finite.refine((v) => v > 0, { message: 'must be positive' });

export const event2dSchema = z.strictObject({ t: finite, x: finite });
export type Event2d = z.infer<typeof event2dSchema>;

export const event4dSchema = z.strictObject({ t: finite, x: finite, y: finite, z: finite });
export type Event4d = z.infer<typeof event4dSchema>;

/** An event in either dimension; the 4D form is tried first so y and z are never dropped. */
export const eventSchema = z.union([event4dSchema, event2dSchema]);
export type Event = z.infer<typeof eventSchema>;

function lightConeOrdered(past: Event2d, future: Event2d): boolean {
  return future.t - past.t > Math.abs(future.x - past.x);
}

/**
 * 2D causal diamond, either between two tips (future tip strictly inside the future light cone of the
 * past tip) or centred on the origin with a given proper time between its tips.
 */
export const diamond2dRegionSchema = z
  .strictObject({
    kind: z.literal('diamond2d'),
    properTime: positive.optional(),
    past: event2dSchema.optional(),
    future: event2dSchema.optional(),
  })
  .refine((r) => (r.properTime !== undefined) !== (r.past !== undefined || r.future !== undefined), {
    message: 'give either properTime or both tips (past and future), not both',
  })
  .refine((r) => r.properTime !== undefined || (r.past !== undefined && r.future !== undefined), {
    message: 'a diamond by its tips needs both past and future',
  })
  .refine((r) => r.past === undefined || r.future === undefined || lightConeOrdered(r.past, r.future), {
    message: 'the future tip must lie strictly inside the future light cone of the past tip',
  });

/**
 * Causal diamond on the flat cylinder: x is periodic with the given circumference, the tips sit at
 * (±properTime/2, 0). When properTime exceeds the circumference the diamond wraps around the cylinder.
 */
export const cylinderDiamondRegionSchema = z.strictObject({
  kind: z.literal('cylinder2d'),
  properTime: positive,
  circumference: positive,
});

/** 2D slab (rectangle) t ∈ [tMin, tMax], x ∈ [xMin, xMax]. */
export const slab2dRegionSchema = z
  .strictObject({
    kind: z.literal('slab2d'),
    tMin: finite,
    tMax: finite,
    xMin: finite,
    xMax: finite,
  })
  .refine((r) => r.tMax > r.tMin && r.xMax > r.xMin, { message: 'slab ranges must have max > min' });

/** 4D causal diamond with tips at (±properTime/2, 0, 0, 0). */
export const diamond4dRegionSchema = z.strictObject({
  kind: z.literal('diamond4d'),
  properTime: positive,
});

export const regionSpecSchema = z.discriminatedUnion('kind', [
  diamond2dRegionSchema,
  cylinderDiamondRegionSchema,
  slab2dRegionSchema,
  diamond4dRegionSchema,
]);
export type RegionSpec = z.infer<typeof regionSpecSchema>;
export type RegionKind = RegionSpec['kind'];
export const regionKinds = ['diamond2d', 'cylinder2d', 'slab2d', 'diamond4d'] as const;

/** Seeded generators from the `seedrandom` package. */
export const prngSchema = z.enum(['arc4', 'alea', 'xor4096']);
export type PrngName = z.infer<typeof prngSchema>;

/**
 * A sprinkling (Bombelli–Lee–Meyer–Sorkin 1987). `fixed` draws exactly `count` points and sets
 * ρ = count/V; `poisson` draws N ~ Poisson(ρV) with ρ given directly or as `count`/V (count is then the
 * expected number of points).
 */
export const sprinklingSpecSchema = z
  .strictObject({
    region: regionSpecSchema,
    process: z.enum(['fixed', 'poisson']).default('fixed'),
    count: z.number().int().min(1).optional(),
    density: positive.optional(),
    seed: z.union([z.string().min(1).max(200), z.number().int()]).transform(String),
    prng: prngSchema.default('arc4'),
  })
  .refine((s) => (s.count === undefined) !== (s.density === undefined), {
    message: 'give exactly one of count and density',
  })
  .refine((s) => s.process === 'poisson' || s.count !== undefined, {
    message: 'a fixed-N sprinkling needs count',
  });
export type SprinklingSpec = z.infer<typeof sprinklingSpecSchema>;
export type SprinklingSpecInput = z.input<typeof sprinklingSpecSchema>;

/**
 * Truncation of the SJ state at a cut λ_c on the positive eigenvalues of iΔ:
 * - none: keep every mode;
 * - sqrtN: λ_c = √N/(4π) (Sorkin–Yazdi 2018, a 2D rule);
 * - lambda: a fixed λ_c;
 * - modes: keep the `count` largest positive eigenvalues;
 * - knee: our automatic knee finder (see server/engine/truncation.ts), `tolerance` is the allowed
 *   relative departure from the power law fitted to the top of the spectrum.
 */
export const truncationRuleSchema = z.discriminatedUnion('rule', [
  z.strictObject({ rule: z.literal('none') }),
  z.strictObject({ rule: z.literal('sqrtN') }),
  z.strictObject({ rule: z.literal('lambda'), cut: finite.refine((v) => v >= 0, { message: 'must be ≥ 0' }) }),
  z.strictObject({ rule: z.literal('modes'), count: z.number().int().min(1) }),
  z.strictObject({ rule: z.literal('knee'), tolerance: positive.max(10).optional() }),
]);
export type TruncationRule = z.infer<typeof truncationRuleSchema>;

/** Parses the short text form `none | sqrtN | lambda:X | modes:K | knee[:TOL]`. */
export function parseTruncationRule(text: string): TruncationRule {
  const [head, arg, extra] = text.trim().split(':');
  const number = (s: string | undefined) => (s !== undefined && s.trim() !== '' ? Number(s) : Number.NaN);
  let candidate: unknown;
  if (extra !== undefined) candidate = null;
  else if (head === 'none' && arg === undefined) candidate = { rule: 'none' };
  else if (head === 'sqrtN' && arg === undefined) candidate = { rule: 'sqrtN' };
  else if (head === 'lambda') candidate = { rule: 'lambda', cut: number(arg) };
  else if (head === 'modes') candidate = { rule: 'modes', count: number(arg) };
  else if (head === 'knee') candidate = arg === undefined ? { rule: 'knee' } : { rule: 'knee', tolerance: number(arg) };
  const parsed = truncationRuleSchema.safeParse(candidate);
  if (!parsed.success) {
    throw new Error(`truncation must be one of none, sqrtN, lambda:X (X ≥ 0), modes:K (K ≥ 1), knee[:TOL]; got "${text}"`);
  }
  return parsed.data;
}

export function formatTruncationRule(rule: TruncationRule): string {
  switch (rule.rule) {
    case 'none':
    case 'sqrtN':
      return rule.rule;
    case 'lambda':
      return `lambda:${rule.cut}`;
    case 'modes':
      return `modes:${rule.count}`;
    case 'knee':
      return rule.tolerance === undefined ? 'knee' : `knee:${rule.tolerance}`;
  }
}

/**
 * Subregion for the entanglement entropy: a causal diamond between two events (membership by the
 * causal order of the whole region, so it respects a periodic x), or an explicit list of element labels.
 */
export const subregionSpecSchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('diamond'), past: eventSchema, future: eventSchema }),
  z.strictObject({ kind: z.literal('elements'), indices: z.array(z.number().int().min(0)).min(2) }),
]);
export type SubregionSpec = z.infer<typeof subregionSpecSchema>;

/** Parses `diamond:T0,X0:T1,X1` (or with four coordinates per tip) and `elements:I,J,K,...`. */
export function parseSubregion(text: string): SubregionSpec {
  const fail = (): never => {
    throw new Error(`subregion must be diamond:T0,X0:T1,X1 (or T,X,Y,Z per tip) or elements:I,J,...; got "${text}"`);
  };
  const parts = text.trim().split(':');
  if (parts[0] === 'diamond' && parts.length === 3) {
    const tip = (s: string): Event => {
      const c = s.split(',').map((v) => (v.trim() === '' ? Number.NaN : Number(v)));
      if (c.some((v) => !Number.isFinite(v))) fail();
      if (c.length === 2) return { t: c[0], x: c[1] };
      if (c.length === 4) return { t: c[0], x: c[1], y: c[2], z: c[3] };
      return fail();
    };
    const past = tip(parts[1]);
    const future = tip(parts[2]);
    if (('y' in past) !== ('y' in future)) fail();
    return subregionSpecSchema.parse({ kind: 'diamond', past, future });
  }
  if (parts[0] === 'elements' && parts.length === 2) {
    const indices = parts[1].split(',').map((v) => (v.trim() === '' ? Number.NaN : Number(v)));
    const parsed = subregionSpecSchema.safeParse({ kind: 'elements', indices });
    if (parsed.success) return parsed.data;
  }
  return fail();
}

/** Which engine a request asks for: one of the two, or auto (the rule in shared/engineChoice.ts). */
export const engineRequestSchema = z.enum(['auto', 'dense', 'structured']);

/** Field and truncation settings of one vacuum computation (the points come separately). */
export const vacuumSettingsSchema = z.strictObject({
  mass: finite.refine((v) => v >= 0, { message: 'mass must be ≥ 0' }).default(0),
  truncation: truncationRuleSchema.default({ rule: 'none' }),
  subregion: subregionSpecSchema.optional(),
  /** truncate the restricted state again at √n/(4π) before the entropy (Sorkin–Yazdi 2018) */
  doubleTruncation: z.boolean().default(false),
  /**
   * dense (N×N matrices, N ≤ 6000), structured (2D non-periodic with sqrtN, lambda or modes: only the
   * modes above the cut, N ≤ 100 000) or auto (the rule in shared/engineChoice.ts)
   */
  engine: engineRequestSchema.optional(),
});
export type VacuumSettings = z.infer<typeof vacuumSettingsSchema>;
export type VacuumSettingsInput = z.input<typeof vacuumSettingsSchema>;

/** The stages a vacuum computation reports progress for, in order. */
export const vacuumStages = ['sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy'] as const;
export type VacuumStage = (typeof vacuumStages)[number];
