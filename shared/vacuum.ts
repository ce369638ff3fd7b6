import { z } from 'zod';
import { eventSchema, regionDescriptors, regionSpecSchema, type Event, type RegionKind } from './regions';

/**
 * Request vocabulary of a vacuum computation on a causal set: regions, sprinklings, truncation rules and
 * subregions. Used by the command-line tool, the run form and the API, so a setting means the same thing
 * everywhere. Conventions (units c = 1, coordinate order t, x[, y, z]) follow server/engine/README.md §1.
 */

const finite = z.number({ message: 'must be a number' }).refine(Number.isFinite, { message: 'must be a finite number' });
const positive = finite.refine((v) => v > 0, { message: 'must be positive' });

// Events and regions live in the region registry; they are part of this vocabulary too.
export {
  event2dSchema,
  event4dSchema,
  eventSchema,
  regionKinds,
  regionSpecSchema,
  type Event,
  type Event2d,
  type Event4d,
  type RegionKind,
  type RegionSpec,
} from './regions';

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
 * The second cut of double truncation (Sorkin–Yazdi 2018, CQG 35 074004): after restricting the truncated
 * state of the whole region to a subregion of n elements, the modes of the restricted iΔ_c with |λ| at or
 * below this cut are dropped before the entropy is solved.
 * - sqrtN: λ_c = √n/(4π) with n the subregion's element count (the published rule, from 2D work; default);
 * - lambda: a fixed λ_c.
 * Without double truncation ("none") only the numerical kernel of the restricted iΔ is dropped.
 */
export const restrictedCutSchema = z.discriminatedUnion('rule', [
  z.strictObject({ rule: z.literal('sqrtN') }),
  z.strictObject({ rule: z.literal('lambda'), cut: finite.refine((v) => v >= 0, { message: 'must be ≥ 0' }) }),
]);
export type RestrictedCut = z.infer<typeof restrictedCutSchema>;
export const DEFAULT_RESTRICTED_CUT: RestrictedCut = { rule: 'sqrtN' };

/** Parses `sqrtN | lambda:X` (the restricted cut of double truncation); `none` gives null (no second cut). */
export function parseRestrictedCut(text: string): RestrictedCut | null {
  const [head, arg, extra] = text.trim().split(':');
  if (extra === undefined && head === 'none' && arg === undefined) return null;
  let candidate: unknown = null;
  if (extra === undefined && head === 'sqrtN' && arg === undefined) candidate = { rule: 'sqrtN' };
  else if (extra === undefined && head === 'lambda') candidate = { rule: 'lambda', cut: arg !== undefined && arg.trim() !== '' ? Number(arg) : Number.NaN };
  const parsed = restrictedCutSchema.safeParse(candidate);
  if (!parsed.success) throw new Error(`restricted cut must be one of none, sqrtN (√n/4π), lambda:X (X ≥ 0); got "${text}"`);
  return parsed.data;
}

export function formatRestrictedCut(cut: RestrictedCut): string {
  return cut.rule === 'sqrtN' ? 'sqrtN' : `lambda:${cut.cut}`;
}

/** The restricted cut in words and symbols: "√n/(4π)" or "λ = 0.5". */
export function restrictedCutText(cut: RestrictedCut): string {
  return cut.rule === 'sqrtN' ? '√n/(4π)' : `λ = ${cut.cut}`;
}

/** The whole-region rule in words and symbols, for labels: "√N/(4π)", "knee", "λ = 0.5", "48 modes". */
export function truncationRuleText(rule: TruncationRule): string {
  switch (rule.rule) {
    case 'none':
      return 'none';
    case 'sqrtN':
      return '√N/(4π)';
    case 'lambda':
      return `λ = ${rule.cut}`;
    case 'modes':
      return `${rule.count} modes`;
    case 'knee':
      return rule.tolerance === undefined ? 'knee' : `knee (tolerance ${rule.tolerance})`;
  }
}

/** How an entropy was computed: the whole-region rule and, with double truncation, the restricted cut. */
export interface EntropyRuleSettings {
  truncation: TruncationRule;
  doubleTruncation?: boolean;
  /** the second cut; absent with double truncation means the default √n/(4π) */
  restrictedCut?: RestrictedCut | null;
}

/** The restricted cut that applies, or null without double truncation. */
export function effectiveRestrictedCut(settings: EntropyRuleSettings): RestrictedCut | null {
  return settings.doubleTruncation ? (settings.restrictedCut ?? DEFAULT_RESTRICTED_CUT) : null;
}

/**
 * One label for an entropy rule, the same on the run page, in tables, exports and e-mails. A whole-region
 * rule `none` with double truncation cuts only the restricted state: it is named "restricted cut only".
 */
export function entropyRuleLabel(settings: EntropyRuleSettings): string {
  const restricted = effectiveRestrictedCut(settings);
  const whole = settings.truncation;
  if (!restricted) return whole.rule === 'none' ? 'untruncated' : `state cut ${truncationRuleText(whole)}`;
  if (whole.rule === 'none') return `restricted cut only (${restrictedCutText(restricted)}; whole-region state untruncated)`;
  return `double-truncated (state ${truncationRuleText(whole)}, restricted ${restrictedCutText(restricted)})`;
}

/**
 * Cautions to show beside results computed with a rule on a region of the given dimension. The cut
 * √N/(4π) (and its restricted form √n/(4π)) comes from 2D work (Sorkin–Yazdi 2018); in 4D it is not
 * derived — on a 500-element 4D diamond it keeps about half of the positive modes — so a 4D result that
 * uses it says so, and the forms offer the knee there.
 */
export function ruleCautions(dimension: 2 | 4, settings: EntropyRuleSettings, kept?: { modes: number; of: number }, regionKind?: RegionKind): string[] {
  if (regionKind && regionDescriptors[regionKind].conformal) return curvedRuleCautions(settings);
  if (dimension !== 4) return [];
  const cautions: string[] = [];
  if (settings.truncation.rule === 'sqrtN') {
    const here = kept ? ` Here it keeps ${kept.modes} of ${kept.of} positive modes.` : '';
    cautions.push(
      `The whole-region cut √N/(4π) is a rule from 2D work (Sorkin–Yazdi 2018); in 4D it is not derived and keeps a large share of the spectrum (about half the positive modes of a 500-element diamond).${here} Treat 4D results with it as a modelling choice; the knee rule is the 4D default.`,
    );
  }
  if (effectiveRestrictedCut(settings)?.rule === 'sqrtN') {
    cautions.push('The restricted cut √n/(4π) of double truncation is a 2D rule as well; in 4D its value is a modelling choice, not a derived cut.');
  }
  return cautions;
}

/**
 * On a curved region (the de Sitter kinds, drawn in conformal coordinates) the cuts √N/(4π) and √n/(4π)
 * are flat 2D rules carried over, not derived there (server/engine/README.md §17).
 */
function curvedRuleCautions(settings: EntropyRuleSettings): string[] {
  const flat2dRule = settings.truncation.rule === 'sqrtN' || effectiveRestrictedCut(settings)?.rule === 'sqrtN';
  return flat2dRule
    ? ['The cut √N/(4π) (and √n/(4π) of double truncation) comes from flat 2D diamonds (Sorkin–Yazdi 2018); on a de Sitter region it is a modelling choice, not a derived cut — compare it with the knee or a fixed λ before reading S.']
    : [];
}

/** The truncation a new run or study proposes for a region of this dimension: √N/(4π) in 2D, the knee in 4D. */
export function defaultTruncationFor(dimension: 2 | 4): TruncationRule {
  return dimension === 4 ? { rule: 'knee' } : { rule: 'sqrtN' };
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

/** At most this many Rényi orders per run or study (each is one sum over the μ, but every output lists them all). */
export const MAX_RENYI_ORDERS = 8;

/**
 * One Rényi order α: a number α > 0, α ≠ 1 (α = 1 is the von Neumann S, reported anyway), or "inf" for
 * the min-entropy S_∞ = Σ ln μ (server/engine/README.md §15).
 */
export const renyiOrderSchema = z.union([
  z.literal('inf'),
  finite
    .refine((a) => a > 0, { message: 'a Rényi order α must be > 0' })
    .refine((a) => a !== 1, { message: 'α = 1 is the von Neumann entropy S, which every result reports; give α ≠ 1' }),
]);
export type RenyiOrder = z.infer<typeof renyiOrderSchema>;

/** The α of one run or study: distinct, at most MAX_RENYI_ORDERS. */
export const renyiOrdersSchema = z
  .array(renyiOrderSchema)
  .min(1, { message: 'give at least one α, or leave the Rényi orders out' })
  .max(MAX_RENYI_ORDERS, { message: `at most ${MAX_RENYI_ORDERS} Rényi orders` })
  .refine((orders) => new Set(orders.map(renyiKey)).size === orders.length, { message: 'Rényi orders must differ' });

/** The key of an order in results and exports: "0.5", "2", "inf" (JSON has no ∞). */
export function renyiKey(order: RenyiOrder): string {
  return order === 'inf' ? 'inf' : String(order);
}

/** Orders sorted ascending, ∞ last: the order of every table, plot and export. */
export function sortedRenyiOrders(orders: readonly RenyiOrder[]): RenyiOrder[] {
  const value = (o: RenyiOrder) => (o === 'inf' ? Number.POSITIVE_INFINITY : o);
  return [...orders].sort((p, q) => value(p) - value(q));
}

/** The symbol of an order for labels: "S_0.5", "S_2", "S_∞". */
export function renyiLabel(order: RenyiOrder | string): string {
  return `S_${order === 'inf' ? '∞' : String(order)}`;
}

/** Parses "0.5,2,3" or "2,inf" (the command line's --renyi). */
export function parseRenyiOrders(text: string): RenyiOrder[] {
  const items = text.split(',').map((s) => s.trim());
  const candidate = items.map((s) => (s === 'inf' || s === '∞' ? 'inf' : s === '' ? Number.NaN : Number(s)));
  const parsed = renyiOrdersSchema.safeParse(candidate);
  if (!parsed.success) {
    throw new Error(`Rényi orders must be a comma-separated list of α > 0, α ≠ 1 (or inf), at most ${MAX_RENYI_ORDERS}, all different; got "${text}": ${parsed.error.issues[0]?.message ?? ''}`);
  }
  return parsed.data;
}

/**
 * Two subregions A and B for the mutual information I(A:B) = S_A + S_B − S_{A∪B} on one state
 * (server/engine/README.md §15): both sub-diamonds (disjoint and spacelike to each other) or both element
 * lists (which a relation list needs).
 */
export const subregionPairSchema = z
  .strictObject({ a: subregionSpecSchema, b: subregionSpecSchema })
  .refine((p) => p.a.kind === p.b.kind, { message: 'A and B must both be sub-diamonds or both element lists', path: ['b'] });
export type SubregionPair = z.infer<typeof subregionPairSchema>;

/** Which engine a request asks for: one of the two, or auto (the rule in shared/engineChoice.ts). */
export const engineRequestSchema = z.enum(['auto', 'dense', 'structured']);

/** Field and truncation settings of one vacuum computation (the points come separately). */
export const vacuumSettingsSchema = z.strictObject({
  mass: finite.refine((v) => v >= 0, { message: 'mass must be ≥ 0' }).default(0),
  truncation: truncationRuleSchema.default({ rule: 'none' }),
  subregion: subregionSpecSchema.optional(),
  /** truncate the restricted state again before the entropy (Sorkin–Yazdi 2018), at `restrictedCut` */
  doubleTruncation: z.boolean().default(false),
  /** the second cut of double truncation: √n/(4π) when absent; refused without double truncation */
  restrictedCut: restrictedCutSchema.optional(),
  /**
   * dense (N×N matrices, N ≤ 6000), structured (2D non-periodic with sqrtN, lambda or modes: only the
   * modes above the cut, N ≤ 100 000) or auto (the rule in shared/engineChoice.ts)
   */
  engine: engineRequestSchema.optional(),
  /** Rényi entropies S_α of the subregion, from the same generalised eigenvalues as S */
  renyi: renyiOrdersSchema.optional(),
  /** I(A:B) of two spacelike subregions on the same state; with double truncation each of A, B, A∪B gets its own restricted cut */
  mutualInformation: subregionPairSchema.optional(),
  /** also the entropy of the subregion's causal complement in the region (a purity check of the whole-region state) */
  complement: z.boolean().default(false),
});
export type VacuumSettings = z.infer<typeof vacuumSettingsSchema>;
export type VacuumSettingsInput = z.input<typeof vacuumSettingsSchema>;

/** The stages a vacuum computation reports progress for, in order. */
export const vacuumStages = ['sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy'] as const;
export type VacuumStage = (typeof vacuumStages)[number];
