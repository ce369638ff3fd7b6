import { z } from 'zod';

/**
 * The region registry: one descriptor per kind of spacetime region, the one place that says what a kind
 * is called, how it is written (text, LaTeX, plot outline), its dimension, whether x is periodic, the
 * fields a form asks for and their defaults, the command-line options, and the sub-diamonds it offers.
 * Every list and label table of the server and the client derives from `regionDescriptors`, which is
 * typed by kind, so a kind without a descriptor (or a descriptor without a field) does not compile. The
 * geometry of each kind (volume, membership, causal order) lives in the engine, server/engine/regions/.
 * Conventions: units c = 1, coordinates in the order t, x[, y, z] (server/engine/README.md §1–§2).
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

/**
 * 2D de Sitter space in units of its radius ℓ = 1/H, in conformal coordinates where the metric is
 * Ω²(−dt² + dx²) (server/engine/README.md §17). Global: ds² = sec²T (−dT² + dθ²), T ∈ (−π/2, π/2),
 * θ ~ θ + 2π; Poincaré patch: ds² = η⁻² (−dη² + dx²), η < 0. A point's t, x hold (T, θ) or (η, x).
 */
const HALF_PI = Math.PI / 2;
const conformalTime = finite.refine((v) => Math.abs(v) < HALF_PI, { message: 'must lie strictly between −π/2 and π/2' });
const conformalTimeOrdered = (r: { conformalTimeMin: number; conformalTimeMax: number }) => r.conformalTimeMax > r.conformalTimeMin;
const conformalTimeOrderMessage = { message: 'conformal time T₁ must be later than T₀', path: ['conformalTimeMax'] };

/** Global 2D de Sitter between the conformal times T₀ < T₁ (a slab of the cylinder, θ periodic with period 2π). */
export const deSitterSlab2dRegionSchema = z
  .strictObject({ kind: z.literal('deSitterSlab2d'), conformalTimeMin: conformalTime, conformalTimeMax: conformalTime })
  .refine(conformalTimeOrdered, conformalTimeOrderMessage);

/** Causal diamond of the Poincaré patch between the tips (η₀, 0) and (η₁, 0), η₀ < η₁ < 0. */
export const deSitterDiamond2dRegionSchema = z
  .strictObject({
    kind: z.literal('deSitterDiamond2d'),
    etaPast: finite.refine((v) => v < 0, { message: 'must be negative (the Poincaré patch has η < 0)' }),
    etaFuture: finite.refine((v) => v < 0, { message: 'must be negative (the Poincaré patch has η < 0)' }),
  })
  .refine((r) => r.etaFuture > r.etaPast, { message: 'the future tip η₁ must be later than the past tip η₀', path: ['etaFuture'] });

/**
 * The part of the static patch of the observer at θ = 0 (the diamond |θ| < π/2 − |T| between its
 * horizon tips (∓π/2, 0)) between the conformal times T₀ < T₁.
 */
export const deSitterStaticPatch2dRegionSchema = z
  .strictObject({ kind: z.literal('deSitterStaticPatch2d'), conformalTimeMin: conformalTime, conformalTimeMax: conformalTime })
  .refine(conformalTimeOrdered, conformalTimeOrderMessage);

export const regionSpecSchema = z.discriminatedUnion('kind', [
  diamond2dRegionSchema,
  cylinderDiamondRegionSchema,
  slab2dRegionSchema,
  diamond4dRegionSchema,
  deSitterSlab2dRegionSchema,
  deSitterDiamond2dRegionSchema,
  deSitterStaticPatch2dRegionSchema,
]);
export type RegionSpec = z.infer<typeof regionSpecSchema>;
export type RegionKind = RegionSpec['kind'];
export type RegionSpecOf<K extends RegionKind> = Extract<RegionSpec, { kind: K }>;

/** A causal diamond by its tips. */
export interface DiamondTips {
  past: Event;
  future: Event;
}

/** A closed outline in the (x, t) plane, x across and t upwards as in a spacetime diagram. */
export interface Outline {
  x: number[];
  y: number[];
}

/**
 * The fields a region form asks for, shared by every kind that has them (the forms hold each as text,
 * so a value typed for one kind stays when switching to another kind with the same field).
 */
export const regionFieldKeys = ['properTime', 'circumference', 'tMin', 'tMax', 'xMin', 'xMax', 'conformalTimeMin', 'conformalTimeMax', 'etaPast', 'etaFuture'] as const;
export type RegionFieldKey = (typeof regionFieldKeys)[number];

export interface RegionFieldText {
  label: string;
  hint?: string;
  /** the message a form shows when the schema refuses the value (its own message is terse) */
  invalid?: string;
}

/** The wording of each field in the run form; other forms change some of it (RegionFieldWording). */
export const regionFieldTexts: Record<RegionFieldKey, RegionFieldText> = {
  properTime: { label: 'Proper time T', hint: 'Between the tips, at t = ±T/2.', invalid: 'The proper time between the tips is a positive number.' },
  circumference: { label: 'Circumference', hint: 'C; x is periodic, a diamond with T > C wraps around.', invalid: 'The circumference is a positive number.' },
  tMin: { label: 't min' },
  tMax: { label: 't max' },
  xMin: { label: 'x min' },
  xMax: { label: 'x max' },
  conformalTimeMin: {
    label: 'Conformal time T₀',
    hint: 'Global conformal time, −π/2 < T₀ < T₁ < π/2 (units of ℓ = 1/H).',
    invalid: 'T₀ is a number strictly between −π/2 and π/2 (about ±1.5708), below T₁.',
  },
  conformalTimeMax: {
    label: 'Conformal time T₁',
    hint: 'Later than T₀ and below π/2 ≈ 1.5708.',
    invalid: 'T₁ is a number strictly between −π/2 and π/2 (about ±1.5708), above T₀.',
  },
  etaPast: { label: 'Past tip η₀', hint: 'Conformal time η of the past tip, at x = 0 (η < 0).', invalid: 'η₀ is a negative number, below η₁.' },
  etaFuture: { label: 'Future tip η₁', hint: 'Conformal time η of the future tip, η₀ < η₁ < 0.', invalid: 'η₁ is a negative number, above η₀.' },
};

/**
 * What the command line needs to read a region from its options (server/cli/main.ts supplies it):
 * the option's text, numbers and pairs with the CLI's messages, and a refusal.
 */
export interface RegionOptionReader {
  option(name: string): string | undefined;
  number(value: string, what: string): number;
  pair(value: string, what: string): [number, number];
  fail(message: string): never;
}

export interface RegionDescriptor<K extends RegionKind = RegionKind> {
  readonly kind: K;
  readonly schema: z.ZodType<RegionSpecOf<K>>;
  /** name in menus, tables and filters: "2D causal diamond" */
  readonly label: string;
  /** a longer name that says where the region lies, for choosing the region of an imported file */
  readonly description: string;
  readonly dimension: 2 | 4;
  /** x is periodic: the causal order (and the Green function) go through the images of each point */
  readonly periodic: boolean;
  /** the form fields, in the order shown; the spec is `{ kind, <field>: number, … }` */
  readonly fields: readonly RegionFieldKey[];
  /** the run form's starting values of the fields (text) */
  readonly defaults: Readonly<Partial<Record<RegionFieldKey, string>>>;
  /** the field a form shows the region's own refinement at (a rule over several fields), if not at the kind */
  readonly refinementField?: RegionFieldKey;
  /** short text for tables and pickers: "2D diamond, T = 2" */
  text(spec: RegionSpecOf<K>): string;
  /** the label with the sizes, for a run's settings: "2D causal diamond, T = 2" */
  settingsText(spec: RegionSpecOf<K>): string;
  /** a noun phrase in LaTeX for a methods paragraph: "a 2D causal diamond of proper time $T = 2$" */
  latex(spec: RegionSpecOf<K>): string;
  /** the boundary drawn behind the points in (x, t); null where no outline applies */
  outline(spec: RegionSpecOf<K>): Outline | null;
  /** the region's own diamond, about whose centre concentric sub-diamonds are scaled; absent when it is none */
  ownDiamond?(spec: RegionSpecOf<K>): DiamondTips;
  /** a sub-diamond that lies wholly in the region, for forms to start from */
  defaultSubDiamond(spec: RegionSpecOf<K>): DiamondTips;
  /**
   * For a curved region drawn in conformal coordinates: what the points' t and x columns hold and the
   * volume element the sprinkling follows, for axis labels, exports and settings. Absent for flat regions.
   */
  readonly conformal?: { readonly t: string; readonly x: string; readonly volumeElement: string };
  /**
   * The tips of the static patch of the observer at θ = 0, (T, θ) = (∓π/2, 0) on the conformal
   * boundary, for a region with cosmological horizons: the sub-diamond between them, clipped to the
   * region, is the part inside that observer's horizons (server/engine/README.md §17).
   */
  horizonDiamond?(spec: RegionSpecOf<K>): DiamondTips;
  /** Absent when a massive field is computed as on every flat region; else why it is refused. */
  readonly massiveField?: { readonly supported: false; readonly reason: string };
  readonly cli: {
    /** the size options and their defaults, one line of `tacet --help` */
    readonly usage: string;
    /** the options that apply to this kind (besides --region) */
    readonly options: readonly string[];
    /** the spec from the options, unvalidated */
    fromOptions(read: RegionOptionReader): unknown;
  };
}

/** Up to six significant digits: short and exact enough for labels. */
const short = (v: number) => String(Number(v.toPrecision(6)));

/** The causal diamond between two timelike-separated events, as a closed outline in (x, t). */
export function diamondOutline(past: { t: number; x: number }, future: { t: number; x: number }): Outline {
  // Light-cone coordinates u = t + x, v = t − x; the side corners mix the tips' u and v.
  const u0 = past.t + past.x;
  const v0 = past.t - past.x;
  const u1 = future.t + future.x;
  const v1 = future.t - future.x;
  const right = { t: (u1 + v0) / 2, x: (u1 - v0) / 2 };
  const left = { t: (u0 + v1) / 2, x: (u0 - v1) / 2 };
  return { x: [past.x, right.x, future.x, left.x, past.x], y: [past.t, right.t, future.t, left.t, past.t] };
}

const centredOutline = (h: number): Outline => ({ x: [0, h, 0, -h, 0], y: [-h, 0, h, 0, -h] });

const coordinates = (e: Event): number[] => ('y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x]);
const toEvent = (c: number[]): Event => (c.length === 4 ? { t: c[0]!, x: c[1]!, y: c[2]!, z: c[3]! } : { t: c[0]!, x: c[1]! });

/** Tips scaled by f about the centre of the given tips: a concentric diamond with proper time f·T. */
export function concentricTips(tips: DiamondTips, fraction: number): DiamondTips {
  const p = coordinates(tips.past);
  const q = coordinates(tips.future);
  const centre = p.map((v, k) => (v + q[k]!) / 2);
  const half = p.map((v, k) => (q[k]! - v) / 2);
  return { past: toEvent(centre.map((c, k) => c - fraction * half[k]!)), future: toEvent(centre.map((c, k) => c + fraction * half[k]!)) };
}

/** Tips at (∓T/2, 0) in 2D or (∓T/2, 0⃗) in 4D. */
function centredTips(properTime: number, dimension: 2 | 4): DiamondTips {
  const h = properTime / 2;
  return dimension === 4
    ? { past: { t: -h, x: 0, y: 0, z: 0 }, future: { t: h, x: 0, y: 0, z: 0 } }
    : { past: { t: -h, x: 0 }, future: { t: h, x: 0 } };
}

/** The proper-time option of the command line, with its default. */
/** A kind's form default as a number: the command line's defaults are the forms', so a file made with one imports with the other. */
const formDefault = (descriptor: { defaults: Readonly<Partial<Record<RegionFieldKey, string>>> }, key: RegionFieldKey): number => Number(descriptor.defaults[key]);

const properTimeOption = (read: RegionOptionReader, fallback: number) => {
  const text = read.option('proper-time');
  return text !== undefined ? read.number(text, '--proper-time') : fallback;
};

const diamond2d: RegionDescriptor<'diamond2d'> = {
  kind: 'diamond2d',
  schema: diamond2dRegionSchema,
  label: '2D causal diamond',
  description: '2D causal diamond, tips at (±T/2, 0)',
  dimension: 2,
  periodic: false,
  fields: ['properTime'],
  defaults: { properTime: '2' },
  text: (r) =>
    r.properTime !== undefined
      ? `2D diamond, T = ${short(r.properTime)}`
      : `2D diamond (${short(r.past!.t)}, ${short(r.past!.x)}) → (${short(r.future!.t)}, ${short(r.future!.x)})`,
  settingsText: (r) => (typeof r.properTime === 'number' ? `${diamond2d.label}, T = ${r.properTime}` : diamond2d.label),
  latex: (r) =>
    r.properTime !== undefined
      ? `a 2D causal diamond of proper time $T = ${r.properTime}$`
      : `the 2D causal diamond between $(t,x) = (${r.past!.t}, ${r.past!.x})$ and $(${r.future!.t}, ${r.future!.x})$`,
  outline: (r) => (typeof r.properTime === 'number' ? centredOutline(r.properTime / 2) : r.past && r.future ? diamondOutline(r.past, r.future) : null),
  ownDiamond: (r) => (r.properTime !== undefined ? centredTips(r.properTime, 2) : { past: r.past!, future: r.future! }),
  defaultSubDiamond: (r) => concentricTips(diamond2d.ownDiamond!(r), 0.5),
  cli: {
    usage: '--proper-time T [2]  or  --tips T0,X0:T1,X1',
    options: ['proper-time', 'tips'],
    fromOptions(read) {
      const tipsText = read.option('tips');
      if (tipsText === undefined) return { kind: 'diamond2d', properTime: properTimeOption(read, formDefault(diamond2d, 'properTime')) };
      if (read.option('proper-time') !== undefined) read.fail('give --proper-time or --tips, not both');
      const tips = tipsText.split(':');
      if (tips.length !== 2) read.fail(`--tips must be T0,X0:T1,X1, got "${tipsText}"`);
      const [t0, x0] = read.pair(tips[0]!, '--tips');
      const [t1, x1] = read.pair(tips[1]!, '--tips');
      return { kind: 'diamond2d', past: { t: t0, x: x0 }, future: { t: t1, x: x1 } };
    },
  },
};

const cylinder2d: RegionDescriptor<'cylinder2d'> = {
  kind: 'cylinder2d',
  schema: cylinderDiamondRegionSchema,
  label: 'Diamond on a cylinder',
  description: 'Diamond on a cylinder (x periodic)',
  dimension: 2,
  periodic: true,
  fields: ['properTime', 'circumference'],
  defaults: { properTime: '2', circumference: '4' },
  text: (r) => `cylinder diamond, T = ${short(r.properTime)}, C = ${short(r.circumference)}`,
  settingsText: (r) => `${cylinder2d.label}, T = ${r.properTime}, circumference C = ${r.circumference}`,
  latex: (r) => `a causal diamond of proper time $T = ${r.properTime}$ on the cylinder of circumference $C = ${r.circumference}$`,
  outline: (r) => {
    const h = r.properTime / 2;
    const c = r.circumference / 2;
    // When the diamond wraps round the cylinder only the strip |x| ≤ C/2 is drawn.
    return h <= c ? centredOutline(h) : { x: [-c, c, c, -c, -c], y: [-h, -h, h, h, -h] };
  },
  ownDiamond: (r) => centredTips(r.properTime, 2),
  defaultSubDiamond: (r) => concentricTips(centredTips(r.properTime, 2), 0.5),
  cli: {
    usage: '--proper-time T [2] --circumference C [4]     (x periodic, x ∈ [−C/2, C/2))',
    options: ['proper-time', 'circumference'],
    fromOptions(read) {
      const circumference = read.option('circumference');
      return {
        kind: 'cylinder2d',
        properTime: properTimeOption(read, formDefault(cylinder2d, 'properTime')),
        circumference: circumference !== undefined ? read.number(circumference, '--circumference') : formDefault(cylinder2d, 'circumference'),
      };
    },
  },
};

const slab2d: RegionDescriptor<'slab2d'> = {
  kind: 'slab2d',
  schema: slab2dRegionSchema,
  label: '2D slab',
  description: '2D slab (rectangle in t, x)',
  dimension: 2,
  periodic: false,
  fields: ['tMin', 'tMax', 'xMin', 'xMax'],
  defaults: { tMin: '0', tMax: '1', xMin: '0', xMax: '4' },
  refinementField: 'tMin',
  text: (r) => `slab t ∈ [${short(r.tMin)}, ${short(r.tMax)}], x ∈ [${short(r.xMin)}, ${short(r.xMax)}]`,
  settingsText: (r) => `${slab2d.label}, t ∈ [${r.tMin}, ${r.tMax}], x ∈ [${r.xMin}, ${r.xMax}]`,
  latex: (r) => `the 2D slab $t \\in [${r.tMin}, ${r.tMax}]$, $x \\in [${r.xMin}, ${r.xMax}]$`,
  outline: (r) => ({ x: [r.xMin, r.xMax, r.xMax, r.xMin, r.xMin], y: [r.tMin, r.tMin, r.tMax, r.tMax, r.tMin] }),
  // A diamond of proper time 2h reaches h to either side of its axis: h = ¼ of the shorter side keeps it well inside.
  defaultSubDiamond: (r) => {
    const t = (r.tMin + r.tMax) / 2;
    const x = (r.xMin + r.xMax) / 2;
    const h = Math.min(r.tMax - r.tMin, r.xMax - r.xMin) / 4;
    return { past: { t: t - h, x }, future: { t: t + h, x } };
  },
  cli: {
    usage: '--t-range T0,T1 [0,1] --x-range X0,X1 [0,4]   (a negative start: --x-range=-1,1)',
    options: ['t-range', 'x-range'],
    fromOptions(read) {
      const tRange = read.option('t-range');
      const xRange = read.option('x-range');
      const [tMin, tMax] = tRange !== undefined ? read.pair(tRange, '--t-range') : [formDefault(slab2d, 'tMin'), formDefault(slab2d, 'tMax')];
      const [xMin, xMax] = xRange !== undefined ? read.pair(xRange, '--x-range') : [formDefault(slab2d, 'xMin'), formDefault(slab2d, 'xMax')];
      return { kind: 'slab2d', tMin, tMax, xMin, xMax };
    },
  },
};

const diamond4d: RegionDescriptor<'diamond4d'> = {
  kind: 'diamond4d',
  schema: diamond4dRegionSchema,
  label: '4D causal diamond',
  description: '4D causal diamond, tips at (±T/2, 0⃗)',
  dimension: 4,
  periodic: false,
  fields: ['properTime'],
  defaults: { properTime: '2' },
  text: (r) => `4D diamond, T = ${short(r.properTime)}`,
  settingsText: (r) => `${diamond4d.label}, T = ${r.properTime}`,
  latex: (r) => `a 4D causal diamond of proper time $T = ${r.properTime}$`,
  outline: () => null,
  ownDiamond: (r) => centredTips(r.properTime, 4),
  defaultSubDiamond: (r) => concentricTips(centredTips(r.properTime, 4), 0.5),
  cli: {
    usage: '--proper-time T [2]',
    options: ['proper-time'],
    fromOptions: (read) => ({ kind: 'diamond4d', properTime: properTimeOption(read, formDefault(diamond4d, 'properTime')) }),
  },
};

// ---- 2D de Sitter (server/engine/README.md §17) ----

/**
 * Why a massive field is refused on de Sitter regions: the massive K of server/engine/README.md §4
 * resums chains of the flat massless K with the flat volume per step, which is not the massive Green
 * function of de Sitter, and no causal-set Green function for a massive field in de Sitter is
 * implemented with a published source to check it against. The massless field is conformally
 * invariant in 2D, so its K = ½Cᵀ (with images on the global slab) holds as on flat regions.
 */
const deSitterMassless = {
  supported: false,
  reason:
    'only the massless field is offered on 2D de Sitter regions: it is conformally invariant, so K = ½Cᵀ holds there, while the massive K of the engine resums chains with the flat volume element and is no Green function of de Sitter',
} as const;

const globalConformal = { t: 'conformal time T', x: 'angle θ', volumeElement: '√−g = ℓ² sec²T' } as const;

/** Conformal times from `--conformal-time T0,T1`, default −1, 1. */
const conformalTimeOptions = (read: RegionOptionReader) => {
  const text = read.option('conformal-time');
  const [conformalTimeMin, conformalTimeMax] = text !== undefined ? read.pair(text, '--conformal-time') : [-1, 1];
  return { conformalTimeMin, conformalTimeMax };
};

const staticPatchTips = (): DiamondTips => ({ past: { t: -Math.PI / 2, x: 0 }, future: { t: Math.PI / 2, x: 0 } });

/** Tips (T ∓ h, 0) about the middle of the conformal-time range, h a quarter of it: well inside either slab. */
const middleSubDiamond = (r: { conformalTimeMin: number; conformalTimeMax: number }): DiamondTips => {
  const t = (r.conformalTimeMin + r.conformalTimeMax) / 2;
  const h = (r.conformalTimeMax - r.conformalTimeMin) / 4;
  return { past: { t: t - h, x: 0 }, future: { t: t + h, x: 0 } };
};

const deSitterSlab2d: RegionDescriptor<'deSitterSlab2d'> = {
  kind: 'deSitterSlab2d',
  schema: deSitterSlab2dRegionSchema,
  label: '2D de Sitter, global slab',
  description: 'Global 2D de Sitter between conformal times T₀, T₁ (θ periodic, points as T, θ)',
  dimension: 2,
  periodic: true,
  fields: ['conformalTimeMin', 'conformalTimeMax'],
  defaults: { conformalTimeMin: '-1', conformalTimeMax: '1' },
  refinementField: 'conformalTimeMax',
  text: (r) => `de Sitter slab T ∈ [${short(r.conformalTimeMin)}, ${short(r.conformalTimeMax)}]`,
  settingsText: (r) => `${deSitterSlab2d.label}, conformal time T ∈ [${r.conformalTimeMin}, ${r.conformalTimeMax}], θ ∈ [−π, π), ℓ = 1`,
  latex: (r) =>
    `the slab of global 2D de Sitter space (radius $\\ell = 1$, $ds^2 = \\sec^2 T\\,(-dT^2 + d\\theta^2)$, $\\theta \\sim \\theta + 2\\pi$) between the conformal times $T_0 = ${r.conformalTimeMin}$ and $T_1 = ${r.conformalTimeMax}$`,
  outline: (r) => ({ x: [-Math.PI, Math.PI, Math.PI, -Math.PI, -Math.PI], y: [r.conformalTimeMin, r.conformalTimeMin, r.conformalTimeMax, r.conformalTimeMax, r.conformalTimeMin] }),
  defaultSubDiamond: middleSubDiamond,
  horizonDiamond: staticPatchTips,
  conformal: globalConformal,
  massiveField: deSitterMassless,
  cli: {
    usage: '--conformal-time T0,T1 [-1,1]   (global conformal time, |T| < π/2; θ periodic; a negative start: --conformal-time=-1,1)',
    options: ['conformal-time'],
    fromOptions: (read) => ({ kind: 'deSitterSlab2d', ...conformalTimeOptions(read) }),
  },
};

const deSitterDiamond2d: RegionDescriptor<'deSitterDiamond2d'> = {
  kind: 'deSitterDiamond2d',
  schema: deSitterDiamond2dRegionSchema,
  label: '2D de Sitter, Poincaré diamond',
  description: 'Causal diamond in the Poincaré patch of 2D de Sitter, tips at (η₀, 0), (η₁, 0) (points as η, x)',
  dimension: 2,
  periodic: false,
  fields: ['etaPast', 'etaFuture'],
  defaults: { etaPast: '-2', etaFuture: '-1' },
  refinementField: 'etaFuture',
  text: (r) => `Poincaré diamond η ∈ [${short(r.etaPast)}, ${short(r.etaFuture)}]`,
  settingsText: (r) => `${deSitterDiamond2d.label}, tips at conformal time η = ${r.etaPast} and ${r.etaFuture} (x = 0), ℓ = 1`,
  latex: (r) =>
    `the causal diamond of the Poincar\\'e patch of 2D de Sitter space (radius $\\ell = 1$, $ds^2 = \\eta^{-2}(-d\\eta^2 + dx^2)$) between $(\\eta, x) = (${r.etaPast}, 0)$ and $(${r.etaFuture}, 0)$`,
  outline: (r) => diamondOutline({ t: r.etaPast, x: 0 }, { t: r.etaFuture, x: 0 }),
  ownDiamond: (r) => ({ past: { t: r.etaPast, x: 0 }, future: { t: r.etaFuture, x: 0 } }),
  defaultSubDiamond: (r) => concentricTips(deSitterDiamond2d.ownDiamond!(r), 0.5),
  conformal: { t: 'conformal time η', x: 'x', volumeElement: '√−g = ℓ²/η²' },
  massiveField: deSitterMassless,
  cli: {
    usage: '--eta-tips E0,E1 [-2,-1]   (conformal times of the tips at x = 0, E0 < E1 < 0: --eta-tips=-2,-1)',
    options: ['eta-tips'],
    fromOptions(read) {
      const text = read.option('eta-tips');
      const [etaPast, etaFuture] = text !== undefined ? read.pair(text, '--eta-tips') : [-2, -1];
      return { kind: 'deSitterDiamond2d', etaPast, etaFuture };
    },
  },
};

/** The static patch |θ| < π/2 − |T| cut to T ∈ [T₀, T₁], as a closed outline in (θ, T). */
function staticPatchOutline(r: { conformalTimeMin: number; conformalTimeMax: number }): Outline {
  const half = (t: number) => Math.PI / 2 - Math.abs(t);
  const t0 = r.conformalTimeMin;
  const t1 = r.conformalTimeMax;
  // the horizon's corner at T = 0, where the past and future horizons meet, when the slab holds it
  const corner = t0 < 0 && t1 > 0 ? [0] : [];
  const right = [t0, ...corner, t1].map((t) => ({ x: half(t), y: t }));
  const left = [...right].reverse().map((p) => ({ x: -p.x, y: p.y }));
  const ring = [...right, ...left, right[0]!];
  return { x: ring.map((p) => p.x), y: ring.map((p) => p.y) };
}

const deSitterStaticPatch2d: RegionDescriptor<'deSitterStaticPatch2d'> = {
  kind: 'deSitterStaticPatch2d',
  schema: deSitterStaticPatch2dRegionSchema,
  label: '2D de Sitter, static patch',
  description: 'Static patch of the observer at θ = 0 in global 2D de Sitter, bounded by its horizons, between conformal times T₀, T₁ (points as T, θ)',
  dimension: 2,
  periodic: false,
  fields: ['conformalTimeMin', 'conformalTimeMax'],
  defaults: { conformalTimeMin: '-1', conformalTimeMax: '1' },
  refinementField: 'conformalTimeMax',
  text: (r) => `de Sitter static patch T ∈ [${short(r.conformalTimeMin)}, ${short(r.conformalTimeMax)}]`,
  settingsText: (r) => `${deSitterStaticPatch2d.label}, |θ| < π/2 − |T|, conformal time T ∈ [${r.conformalTimeMin}, ${r.conformalTimeMax}], ℓ = 1`,
  latex: (r) =>
    `the part between the conformal times $T_0 = ${r.conformalTimeMin}$ and $T_1 = ${r.conformalTimeMax}$ of the static patch $|\\theta| < \\pi/2 - |T|$ of an observer at $\\theta = 0$ in global 2D de Sitter space (radius $\\ell = 1$, $ds^2 = \\sec^2 T\\,(-dT^2 + d\\theta^2)$), bounded by the cosmological horizon`,
  outline: staticPatchOutline,
  defaultSubDiamond: middleSubDiamond,
  horizonDiamond: staticPatchTips,
  conformal: globalConformal,
  massiveField: deSitterMassless,
  cli: {
    usage: '--conformal-time T0,T1 [-1,1]   (the static patch |θ| < π/2 − |T| of the observer at θ = 0, cut to T0 < T < T1)',
    options: ['conformal-time'],
    fromOptions: (read) => ({ kind: 'deSitterStaticPatch2d', ...conformalTimeOptions(read) }),
  },
};

/** Every region kind's descriptor, in the order menus list them. */
export const regionDescriptors: { readonly [K in RegionKind]: RegionDescriptor<K> } = {
  diamond2d,
  cylinder2d,
  slab2d,
  diamond4d,
  deSitterSlab2d,
  deSitterDiamond2d,
  deSitterStaticPatch2d,
};

export const regionKinds = Object.keys(regionDescriptors) as RegionKind[];

/** The kind a new run or study starts with. */
export const defaultRegionKind: RegionKind = 'diamond2d';

/** The descriptor of a kind, as the common shape (for code that holds a spec of any kind). */
export function regionDescriptor<K extends RegionKind>(kind: K): RegionDescriptor<K> {
  return regionDescriptors[kind] as RegionDescriptor<K>;
}

/** The descriptor of a kind given as text (a stored row, a query), or undefined for no region kind. */
export function findRegionDescriptor(kind: string): RegionDescriptor | undefined {
  return Object.hasOwn(regionDescriptors, kind) ? (regionDescriptors[kind as RegionKind] as RegionDescriptor) : undefined;
}

const forSpec = <K extends RegionKind>(spec: RegionSpecOf<K>) => regionDescriptor<K>(spec.kind as K);

export const regionDimension = (kind: RegionKind): 2 | 4 => regionDescriptors[kind].dimension;

/** Whether a kind (given as text, e.g. a run's stored region kind) has a periodic x. */
export const isPeriodicRegionKind = (kind: string): boolean => findRegionDescriptor(kind)?.periodic === true;

/** The kinds of one dimension, in registry order. */
export const regionKindsOfDimension = (dimension: 2 | 4): RegionKind[] => regionKinds.filter((k) => regionDescriptors[k].dimension === dimension);

/** Menu label of each kind. */
export const regionLabels = Object.fromEntries(regionKinds.map((k) => [k, regionDescriptors[k].label])) as Record<RegionKind, string>;

export const regionText = (spec: RegionSpec): string => forSpec(spec).text(spec);
export const regionSettingsText = (spec: RegionSpec): string => forSpec(spec).settingsText(spec);
export const regionLatex = (spec: RegionSpec): string => forSpec(spec).latex(spec);
export const regionOutlineOf = (spec: RegionSpec): Outline | null => forSpec(spec).outline(spec);
/** The region's own diamond, or null for a region that is none (a slab). */
export const regionOwnDiamond = (spec: RegionSpec): DiamondTips | null => forSpec(spec).ownDiamond?.(spec) ?? null;
export const regionDefaultSubDiamond = (spec: RegionSpec): DiamondTips => forSpec(spec).defaultSubDiamond(spec);

// ---- forms ----

/** The region part of a form, as typed: the kind and every field's text. */
export type RegionFieldValues = { regionKind: RegionKind } & { [K in RegionFieldKey]: string };

/** Changes one form makes to the run form's wording; a hint of null shows none. */
export type RegionFieldWording = Partial<Record<RegionFieldKey, { label?: string; hint?: string | null | ((kind: RegionKind) => string) }>>;

export interface RegionFormField {
  key: RegionFieldKey;
  label: string;
  hint?: string;
}

/** The fields a form shows for a kind, with their wording (RegionFields in src/ui renders them). */
export function regionFormFields(kind: RegionKind, wording: RegionFieldWording = {}): RegionFormField[] {
  return regionDescriptors[kind].fields.map((key) => {
    const own = wording[key];
    const hint = own?.hint === undefined ? regionFieldTexts[key].hint : typeof own.hint === 'function' ? own.hint(kind) : own.hint;
    return { key, label: own?.label ?? regionFieldTexts[key].label, ...(hint ? { hint } : {}) };
  });
}

/**
 * Every field's starting text: the descriptors' defaults (kinds that share a field agree on it, which
 * the registry test checks), blank for a field no kind gives a default.
 */
export function regionFieldDefaults(): { [K in RegionFieldKey]: string } {
  const values = Object.fromEntries(regionFieldKeys.map((k) => [k, ''])) as { [K in RegionFieldKey]: string };
  for (const kind of regionKinds) Object.assign(values, regionDescriptors[kind].defaults);
  return values;
}

/**
 * The region a form's fields describe, still unvalidated (the shared schema names a bad value at
 * `…region.<field>`): `read` turns a field's text into a number, undefined when blank.
 */
export function regionFromFields(kind: RegionKind, read: (key: RegionFieldKey) => number | undefined): unknown {
  return { kind, ...Object.fromEntries(regionDescriptors[kind].fields.map((key) => [key, read(key)])) };
}

/** `regionFromFields` on the text as typed: blank is undefined, anything else Number() (NaN for no number). */
export function regionFromFieldText(values: RegionFieldValues): unknown {
  return regionFromFields(values.regionKind, (key) => {
    const text = values[key].trim();
    return text === '' ? undefined : Number(text);
  });
}
