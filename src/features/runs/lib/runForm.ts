import { STRUCTURED_MAX_N_2D, type EngineRequest } from '@shared/engineChoice';
import { createRunRequestSchema, type CreateRunRequest } from '@shared/runs';
import {
  defaultRegionKind,
  regionDefaultSubDiamond,
  regionDescriptors,
  regionDimension,
  regionFieldDefaults,
  regionFieldKeys,
  regionFieldTexts,
  regionFromFields,
  regionFromFieldText,
  regionLabels as regionKindLabels,
  regionSpecSchema,
  type DiamondTips,
  type RegionFieldValues,
  type RegionKind,
} from '@shared/regions';
import {
  defaultTruncationFor,
  type PrngName,
  type RenyiOrder,
  type RestrictedCut,
  type SprinklingSpec,
  type SubregionPair,
  type SubregionSpec,
  type TruncationRule,
} from '@shared/vacuum';
import { renyiOrdersFromText } from '../../../ui/RenyiOrdersField';
import type { z } from 'zod';
import { parseNumber, type FieldErrors } from '../../../lib/forms';
import {
  defaultRestrictedCutForm,
  defaultTruncation,
  restrictedCutFromForm,
  restrictedCutToForm,
  truncationFieldMessages,
  truncationFromForm,
  truncationToForm,
  type RestrictedCutFormValues,
  type TruncationFormValues,
} from '../../../lib/truncationForm';
import { capitalise, denseLimitN, denseLimits, engineLimitOf } from './engineNotes';

/**
 * The truncation the form proposes when the region changes: √N/(4π) in 2D, the knee in 4D (√N/(4π) is a
 * 2D rule). A rule the user chose (any other than the old dimension's default) is kept.
 */
export function truncationForRegionChange(current: TruncationFormValues, from: RegionKind, to: RegionKind): TruncationFormValues {
  const oldDefault = truncationToForm(defaultTruncationFor(regionDimension(from)));
  if (current.kind !== oldDefault.kind || current.value !== oldDefault.value) return current;
  return truncationToForm(defaultTruncationFor(regionDimension(to)));
}

export interface TipValues {
  t: string;
  x: string;
  y: string;
  z: string;
}

/** Everything the new-run form holds, as typed (numbers stay text until submitting); the region's fields come from the registry. */
export interface RunFormValues extends RegionFieldValues {
  title: string;
  /** sprinkle a causal set, or compute on an imported one of the team */
  source: 'sprinkle' | 'imported';
  causalSetId: string;
  sizeBy: 'count' | 'density';
  count: string;
  density: string;
  process: 'fixed' | 'poisson';
  seed: string;
  prng: PrngName;
  mass: string;
  truncation: TruncationFormValues;
  withSubregion: boolean;
  /** a diamond by its tips (coordinates only) or a list of element labels */
  subregionBy: 'tips' | 'elements';
  /** comma-separated element labels, 0-based as in the imported file */
  elementList: string;
  past: TipValues;
  future: TipValues;
  doubleTruncation: boolean;
  restrictedCut: RestrictedCutFormValues;
  /** which engine computes the run: the documented rule (auto) or a forced one */
  engine: EngineRequest;
  /** Rényi orders of the subregion's entropy, as typed ("0.5, 2, inf"); blank for none */
  renyi: string;
  /** the entropy of the subregion's causal complement beside S */
  complement: boolean;
  /** two spacelike subregions A and B for I(A:B) */
  withPair: boolean;
  pairA: SubregionShapeValues;
  pairB: SubregionShapeValues;
}

/** One subregion of a pair as typed: tips, or element labels on an imported set (as `subregionBy` says). */
export interface SubregionShapeValues {
  past: TipValues;
  future: TipValues;
  elementList: string;
}

/** What the form needs to know of the picked imported causal set. */
export interface PickedCausalSet {
  id: string;
  kind: 'coordinates' | 'relations';
  dimension: 2 | 4;
  N: number;
}

/** A fresh seed: eight hex digits from the browser's random source. */
export function newSeed(): string {
  const bytes = new Uint8Array(4);
  globalThis.crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/** The default region as the form starts with it, and a sub-diamond inside it for the tips. */
const defaultRegionFields = { regionKind: defaultRegionKind, ...regionFieldDefaults() };
const defaultSubDiamond = regionDefaultSubDiamond(regionSpecSchema.parse(regionFromFieldText(defaultRegionFields)));
const tipText = (tip: { t: number; x: number; y?: number; z?: number }): TipValues => ({ t: String(tip.t), x: String(tip.x), y: String(tip.y ?? 0), z: String(tip.z ?? 0) });

/**
 * A and B the form starts with: two diamonds of half the default sub-diamond's height, side by side at
 * ∓ its half-height in x, so they are disjoint and spacelike to each other and lie inside the region.
 */
function defaultPairSide(side: -1 | 1, subDiamond: DiamondTips = defaultSubDiamond): SubregionShapeValues {
  const { past, future } = subDiamond;
  const halfHeight = (future.t - past.t) / 2;
  const t = (past.t + future.t) / 2;
  const x = (past.x + future.x) / 2 + side * halfHeight;
  return { past: tipText({ t: t - halfHeight / 2, x }), future: tipText({ t: t + halfHeight / 2, x }), elementList: '' };
}

/**
 * The subregion and pair tips for the region the form now describes: its own default sub-diamond and the
 * pair beside it (the registry's `defaultSubDiamond`), so a change of kind (a de Sitter diamond lies at
 * η < 0) never leaves the tips outside the region. Nothing changes while the region's fields do not parse.
 */
export function tipsForRegion(values: RegionFieldValues): Pick<RunFormValues, 'past' | 'future' | 'pairA' | 'pairB'> | null {
  const region = regionSpecSchema.safeParse(regionFromFieldText(values));
  if (!region.success) return null;
  const sub = regionDefaultSubDiamond(region.data);
  return { past: tipText(sub.past), future: tipText(sub.future), pairA: defaultPairSide(-1, sub), pairB: defaultPairSide(1, sub) };
}

/**
 * The tips of the part of the region inside the horizons of the observer at θ = 0 (the registry's
 * `horizonDiamond`, server/engine/README.md §17), or null for a region without horizons or while its
 * fields do not parse. The engine accepts these tips on the conformal boundary (subregionCheck).
 */
export function horizonTipsForRegion(values: RegionFieldValues): Pick<RunFormValues, 'past' | 'future'> | null {
  const horizonDiamond = regionDescriptors[values.regionKind].horizonDiamond as ((spec: unknown) => DiamondTips) | undefined;
  if (!horizonDiamond) return null;
  const region = regionSpecSchema.safeParse(regionFromFieldText(values));
  if (!region.success) return null;
  const tips = horizonDiamond(region.data);
  return { past: tipText(tips.past), future: tipText(tips.future) };
}

/** Why a region offers the massless field only (the de Sitter kinds), or null. */
export function masslessOnlyReason(kind: RegionKind): string | null {
  return regionDescriptors[kind].massiveField?.reason ?? null;
}

export function defaultRunForm(seed: string = newSeed()): RunFormValues {
  return {
    title: '',
    source: 'sprinkle',
    causalSetId: '',
    ...defaultRegionFields,
    sizeBy: 'count',
    count: '500',
    density: '',
    process: 'fixed',
    seed,
    prng: 'arc4',
    mass: '0',
    truncation: { ...defaultTruncation },
    withSubregion: false,
    subregionBy: 'tips',
    elementList: '',
    // the default region's own sub-diamond: half its proper time, about its centre
    past: tipText(defaultSubDiamond.past),
    future: tipText(defaultSubDiamond.future),
    doubleTruncation: false,
    restrictedCut: { ...defaultRestrictedCutForm },
    engine: 'auto',
    renyi: '',
    complement: false,
    withPair: false,
    pairA: defaultPairSide(-1),
    pairB: defaultPairSide(1),
  };
}

/**
 * The settings a run keeps of its request (GET /api/runs/:id `request`), as far as the form reads them:
 * a POST body, or what the server stored from one (an imported set by reference, a re-analysis with
 * its parent's sprinkling beside `reusedPoints`).
 */
export interface StoredRunSettings {
  title?: string;
  mass?: number;
  truncation?: TruncationRule;
  subregion?: SubregionSpec;
  doubleTruncation?: boolean;
  restrictedCut?: RestrictedCut;
  sprinkling?: SprinklingSpec;
  causalSetId?: string;
  causalSet?: { id: string };
  engine?: EngineRequest;
  renyi?: RenyiOrder[];
  mutualInformation?: SubregionPair;
  complement?: boolean;
}

const labelsText = (indices: readonly number[]) => indices.join(', ');

function shapeFromSpec(spec: SubregionSpec, fallback: SubregionShapeValues): SubregionShapeValues {
  return spec.kind === 'elements'
    ? { ...fallback, elementList: labelsText(spec.indices) }
    : { past: tipText(spec.past), future: tipText(spec.future), elementList: '' };
}

/**
 * The new-run form holding a run's settings, for "Open in the new-run form": the inverse of
 * `runRequestFromForm`, so a form read back from the request it made is the same form. Fields the
 * request leaves out keep the defaults (the region's own sub-diamond and pair, a count of 500 beside a
 * density, the seed of a run on an imported set fresh).
 */
export function runFormFromRequest(request: StoredRunSettings, seed: string = newSeed()): RunFormValues {
  const base = defaultRunForm(seed);
  const sprinkling = request.sprinkling;
  const region = sprinkling?.region as (Record<string, unknown> & { kind: RegionKind }) | undefined;
  const regionFields: RegionFieldValues = { regionKind: base.regionKind, ...regionFieldDefaults() };
  if (region) {
    regionFields.regionKind = region.kind;
    for (const key of regionDescriptors[region.kind].fields) regionFields[key] = String(region[key]);
  }
  const tips = tipsForRegion(regionFields) ?? { past: base.past, future: base.future, pairA: base.pairA, pairB: base.pairB };
  const subregion = request.subregion;
  const pair = request.mutualInformation;
  const byElements = subregion?.kind === 'elements' || pair?.a.kind === 'elements';
  const form: RunFormValues = {
    ...base,
    ...regionFields,
    ...tips,
    title: request.title ?? '',
    source: sprinkling ? 'sprinkle' : 'imported',
    causalSetId: request.causalSetId ?? request.causalSet?.id ?? '',
    mass: String(request.mass ?? 0),
    truncation: request.truncation ? truncationToForm(request.truncation) : { ...defaultTruncation },
    withSubregion: subregion !== undefined,
    subregionBy: byElements ? 'elements' : 'tips',
    elementList: subregion?.kind === 'elements' ? labelsText(subregion.indices) : '',
    doubleTruncation: request.doubleTruncation ?? false,
    restrictedCut: restrictedCutToForm(request.restrictedCut),
    engine: request.engine ?? 'auto',
    renyi: request.renyi ? request.renyi.map(String).join(', ') : '',
    complement: request.complement ?? false,
    withPair: pair !== undefined,
    pairA: pair ? shapeFromSpec(pair.a, tips.pairA) : tips.pairA,
    pairB: pair ? shapeFromSpec(pair.b, tips.pairB) : tips.pairB,
  };
  if (subregion?.kind === 'diamond') Object.assign(form, { past: tipText(subregion.past), future: tipText(subregion.future) });
  if (sprinkling) {
    Object.assign(form, {
      process: sprinkling.process,
      sizeBy: sprinkling.count !== undefined ? 'count' : 'density',
      count: sprinkling.count !== undefined ? String(sprinkling.count) : base.count,
      density: sprinkling.density !== undefined ? String(sprinkling.density) : '',
      seed: sprinkling.seed,
      prng: sprinkling.prng,
    });
  }
  return form;
}

/**
 * The form for a run on one imported set, as the set's page opens it: the set picked and named, its dimension's
 * default cut (√N/(4π) is a 2D rule, so a 4D set starts from the knee) and double truncation on
 * (Sorkin–Yazdi 2018: without the second cut a subregion's entropy on a causal set follows its volume).
 */
export function runFormForCausalSet(set: Pick<PickedCausalSet, 'id' | 'dimension'> & { name?: string }, seed: string = newSeed()): RunFormValues {
  return {
    ...defaultRunForm(seed),
    // the run is named after its set, as the runs table lists it
    title: set.name ?? '',
    source: 'imported',
    causalSetId: set.id,
    truncation: truncationToForm(defaultTruncationFor(set.dimension)),
    doubleTruncation: true,
  };
}

// the forms and their tests take the dimension from here as well
export { regionDimension };

const runRegionLabels: Record<RegionKind | 'imported', string> = { ...regionKindLabels, imported: 'Imported causal set' };
/** The label of every region kind of a run, and of a run on an imported set, by a row's stored kind (the runs table and its filter). */
export const regionLabels: Readonly<Record<string, string>> = runRegionLabels;

/** Numbers typed into the form, with the path each goes to; text that is no number is reported here. */
export class NumberReader {
  readonly errors: FieldErrors = {};
  read(text: string, path: string): number | undefined {
    const value = parseNumber(text);
    if (value !== undefined && !Number.isFinite(value) && !(path in this.errors)) this.errors[path] = 'Enter a number.';
    return value;
  }
}

function tip(reader: NumberReader, values: TipValues, path: string, dimension: 2 | 4) {
  const event: Record<string, number | undefined> = {
    t: reader.read(values.t, `${path}.t`),
    x: reader.read(values.x, `${path}.x`),
  };
  if (dimension === 4) {
    event.y = reader.read(values.y, `${path}.y`);
    event.z = reader.read(values.z, `${path}.z`);
  }
  return event;
}

function regionFromForm(reader: NumberReader, v: RunFormValues): unknown {
  return regionFromFields(v.regionKind, (key) => reader.read(v[key], `sprinkling.region.${key}`));
}

/** Human messages for the fields whose schema messages are terse ("Too small: expected ..."). */
const fieldMessages: Record<string, string> = {
  'sprinkling.count': `N is a whole number of elements, at least 2; at most ${denseLimitN} on the dense engine (${denseLimits['ml-matrix']} without the native backend), ${STRUCTURED_MAX_N_2D} on the structured one (2D with a sqrtN, lambda or modes cut).`,
  'sprinkling.density': 'The density ρ is a positive number (elements per unit volume).',
  'sprinkling.seed': 'Give a seed (any text or number), or press “New seed”.',
  ...Object.fromEntries(regionFieldKeys.flatMap((key) => (regionFieldTexts[key].invalid ? [[`sprinkling.region.${key}`, regionFieldTexts[key].invalid]] : []))),
  mass: 'The mass is a number ≥ 0.',
  ...truncationFieldMessages,
};

const tipFieldMessage = 'Each tip coordinate is a number.';

/**
 * Where a schema issue is shown. Issues without a field of their own (object-level refinements) go to
 * the field they are about: the size when count/density are missing, the region's first field otherwise.
 */
export function fieldForIssuePath(path: string): string {
  if (path === 'sprinkling') return 'sprinkling.count';
  if (path === 'sprinkling.region') return 'sprinkling.region';
  if (path === 'subregion' || path === 'subregion.past' || path === 'subregion.future') return 'subregion';
  if (path.startsWith('subregion.indices')) return 'subregion.indices';
  const pairSide = /^mutualInformation\.([ab])(\.(past|future|indices))?(\..*)?$/.exec(path);
  if (pairSide) {
    if (pairSide[3] === 'indices') return `mutualInformation.${pairSide[1]}.indices`;
    if (pairSide[4] && /^\.[txyz]$/.test(pairSide[4])) return path;
    return `mutualInformation.${pairSide[1]}`;
  }
  if (path.startsWith('renyi')) return 'renyi';
  return path;
}

export function humanise(errors: FieldErrors): FieldErrors {
  const out: FieldErrors = {};
  for (const [rawPath, message] of Object.entries(errors)) {
    const path = fieldForIssuePath(rawPath);
    if (path in out) continue;
    if (path in fieldMessages) out[path] = fieldMessages[path];
    else if (/^(subregion|mutualInformation\.[ab])\.(past|future)\.[txyz]$/.test(path)) out[path] = tipFieldMessage;
    else out[path] = message;
  }
  return out;
}

export function schemaErrors(issues: z.core.$ZodIssue[]): FieldErrors {
  const errors: FieldErrors = {};
  for (const issue of issues) {
    const path = issue.path.map(String).join('.') || 'form';
    if (!(path in errors)) errors[path] = issue.message;
  }
  return errors;
}

interface TipNumbers {
  t: number;
  x: number;
  y?: number;
  z?: number;
}

/** True when `future` lies strictly inside the future light cone of `past` (c = 1). */
export function insideFutureLightCone(past: TipNumbers, future: TipNumbers): boolean {
  const dt = future.t - past.t;
  const dx = future.x - past.x;
  const dy = (future.y ?? 0) - (past.y ?? 0);
  const dz = (future.z ?? 0) - (past.z ?? 0);
  return dt > 0 && dt * dt > dx * dx + dy * dy + dz * dz;
}

const lightConeMessage =
  'The future tip must lie strictly inside the future light cone of the past tip (Δt greater than the spatial distance), or the subregion is empty.';

/** A diamond from its typed tips; `path` is where its numbers' messages go ("subregion", "mutualInformation.a"). */
export function diamondFromTips(reader: NumberReader, tips: { past: TipValues; future: TipValues }, dimension: 2 | 4, path = 'subregion') {
  return { kind: 'diamond', past: tip(reader, tips.past, `${path}.past`, dimension), future: tip(reader, tips.future, `${path}.future`, dimension) };
}

export function subregionFromForm(reader: NumberReader, v: Pick<RunFormValues, 'past' | 'future'>, dimension: 2 | 4) {
  return diamondFromTips(reader, v, dimension);
}

function finiteTip(tip: unknown): tip is TipNumbers {
  return typeof tip === 'object' && tip !== null && Object.values(tip).every((c) => typeof c === 'number' && Number.isFinite(c));
}

/**
 * Checks what the shared schema cannot: the subregion's tips are causally ordered. Done on the typed
 * numbers, so the message shows together with any other field's.
 */
export function subregionLightConeError(subregion: unknown, path = 'subregion'): FieldErrors {
  const diamond = subregion as { kind?: string; past?: unknown; future?: unknown } | undefined;
  if (!diamond || diamond.kind === 'elements' || !finiteTip(diamond.past) || !finiteTip(diamond.future)) return {};
  if (insideFutureLightCone(diamond.past, diamond.future)) return {};
  return { [`${path}.future.t`]: lightConeMessage };
}

/**
 * The entropy extras of a run body from the form: the Rényi orders and the complement check (both of
 * the subregion, so only with one) and the pair A, B — tips, or element labels when `byElements`; the
 * messages of the form's own reading go into `errors` under the request's paths.
 */
export function entropyExtrasFromForm(
  v: Pick<RunFormValues, 'withSubregion' | 'renyi' | 'complement' | 'withPair' | 'pairA' | 'pairB'>,
  reader: NumberReader,
  dimension: 2 | 4,
  errors: FieldErrors,
  elements: { byElements: boolean; N: number | null } = { byElements: false, N: null },
): Record<string, unknown> {
  const extras: Record<string, unknown> = {};
  if (v.withSubregion) {
    const renyi = renyiOrdersFromText(v.renyi);
    if (renyi.error) errors.renyi = renyi.error;
    else if (renyi.orders) extras.renyi = renyi.orders;
    if (v.complement) extras.complement = true;
  }
  if (v.withPair) {
    const pair: Record<string, unknown> = {};
    for (const [side, values] of [['a', v.pairA], ['b', v.pairB]] as const) {
      const path = `mutualInformation.${side}`;
      if (elements.byElements) {
        const labels = parseElementList(values.elementList, elements.N);
        if (typeof labels === 'string') errors[`${path}.indices`] = labels;
        else pair[side] = { kind: 'elements', indices: labels };
      } else {
        pair[side] = diamondFromTips(reader, values, dimension, path);
        Object.assign(errors, subregionLightConeError(pair[side], path));
      }
    }
    extras.mutualInformation = pair;
  }
  return extras;
}

/**
 * "0, 1, 2 5" → [0, 1, 2, 5]. Returns a message instead when a label is no whole number in 0..N−1,
 * is listed twice, or fewer than two are given (the entropy needs two).
 */
export function parseElementList(text: string, N: number | null): number[] | string {
  const parts = text.split(/[\s,;]+/).filter((p) => p !== '');
  const labels: number[] = [];
  for (const part of parts) {
    const label = /^\d+$/.test(part) ? Number(part) : Number.NaN;
    if (!Number.isSafeInteger(label)) return `“${part}” is not an element label (a whole number from 0).`;
    if (N !== null && label >= N) return `Element ${label} does not exist: the causal set has ${N} elements, labelled 0 to ${N - 1}.`;
    if (labels.includes(label)) return `Element ${label} is listed twice.`;
    labels.push(label);
  }
  if (labels.length < 2) return 'List at least two elements, separated by commas.';
  return labels;
}

/**
 * The body of a run on an imported causal set: the set's id and the field settings; the subregion by
 * tips only for coordinates (with the set's dimension), as an element list otherwise.
 */
function importedRunRequest(v: RunFormValues, picked: PickedCausalSet | null): Checked<CreateRunRequest> {
  const reader = new NumberReader();
  const errors: FieldErrors = {};
  if (!picked || picked.id !== v.causalSetId) errors.causalSetId = 'Pick one of the team’s imported causal sets.';
  const candidate: Record<string, unknown> = {
    causalSetId: v.causalSetId,
    mass: reader.read(v.mass, 'mass') ?? 0,
    truncation: truncationFromForm(v.truncation),
    doubleTruncation: (v.withSubregion || v.withPair) && v.doubleTruncation,
    restrictedCut: restrictedCutFromForm((v.withSubregion || v.withPair) && v.doubleTruncation, v.restrictedCut),
  };
  if (v.engine !== 'auto') candidate.engine = v.engine;
  const byElements = v.subregionBy === 'elements' || picked?.kind === 'relations';
  Object.assign(candidate, entropyExtrasFromForm(v, reader, picked?.dimension ?? 2, errors, { byElements, N: picked?.N ?? null }));
  if (v.engine === 'structured' && picked?.kind === 'relations') {
    errors.engine = 'The structured engine sweeps light-cone coordinates; a relation list has none, so it runs on the dense engine.';
  }
  if (v.title.trim()) candidate.title = v.title.trim();
  if (v.withSubregion) {
    if (byElements) {
      const labels = parseElementList(v.elementList, picked?.N ?? null);
      if (typeof labels === 'string') errors['subregion.indices'] = labels;
      else candidate.subregion = { kind: 'elements', indices: labels };
    } else {
      candidate.subregion = subregionFromForm(reader, v, picked?.dimension ?? 2);
    }
  }
  const parsed = createRunRequestSchema.safeParse(candidate);
  // the form's own messages (which set, which label) say more than the schema's
  Object.assign(errors, { ...(parsed.success ? {} : humanise(schemaErrors(parsed.error.issues))), ...reader.errors, ...errors });
  if (candidate.subregion && (candidate.subregion as { kind: string }).kind === 'diamond') Object.assign(errors, subregionLightConeError(candidate.subregion));
  if (!parsed.success || Object.keys(errors).length > 0) return { ok: false, errors };
  return { ok: true, request: parsed.data };
}

export type Checked<T> = { ok: true; request: T } | { ok: false; errors: FieldErrors };

/**
 * Maps the form to a POST /api/runs body and validates it with the shared schema, so the form refuses
 * what the server would refuse, with a message beside the field at fault. `maxN` is the server's dense
 * limit when known (GET /api/limits).
 */
export function runRequestFromForm(v: RunFormValues, maxN: number = denseLimitN, picked: PickedCausalSet | null = null): Checked<CreateRunRequest> {
  if (v.source === 'imported') return importedRunRequest(v, picked);
  const reader = new NumberReader();
  const dimension = regionDimension(v.regionKind);
  const sprinkling: Record<string, unknown> = {
    region: regionFromForm(reader, v),
    process: v.process,
    seed: v.seed.trim(),
    prng: v.prng,
  };
  if (v.sizeBy === 'count' || v.process === 'fixed') sprinkling.count = reader.read(v.count, 'sprinkling.count');
  else sprinkling.density = reader.read(v.density, 'sprinkling.density');

  const candidate: Record<string, unknown> = {
    sprinkling,
    mass: reader.read(v.mass, 'mass') ?? 0,
    truncation: truncationFromForm(v.truncation),
    doubleTruncation: (v.withSubregion || v.withPair) && v.doubleTruncation,
    restrictedCut: restrictedCutFromForm((v.withSubregion || v.withPair) && v.doubleTruncation, v.restrictedCut),
  };
  if (v.title.trim()) candidate.title = v.title.trim();
  if (v.engine !== 'auto') candidate.engine = v.engine;
  if (v.withSubregion) candidate.subregion = subregionFromForm(reader, v, dimension);
  const formErrors: FieldErrors = {};
  Object.assign(candidate, entropyExtrasFromForm(v, reader, dimension, formErrors));

  const parsed = createRunRequestSchema.safeParse(candidate);
  const errors: FieldErrors = { ...(parsed.success ? {} : humanise(schemaErrors(parsed.error.issues))), ...reader.errors, ...formErrors };
  const limit = engineLimitOf(v, maxN);
  if (limit.unsupported && v.engine === 'structured') errors.engine = `${capitalise(limit.unsupported)}.`;
  const count = sprinkling.count;
  if (typeof count === 'number' && Number.isInteger(count) && (count < 2 || (limit.maxN > 0 && count > limit.maxN)) && !errors['sprinkling.count']) {
    errors['sprinkling.count'] =
      count < 2
        ? 'A causal set needs at least 2 elements.'
        : limit.engine === 'dense'
          ? `N = ${count} is above the dense limit of ${limit.maxN} elements: the engine holds about 7 N×N float64 matrices in memory at once (≈ ${((7 * 8 * count * count) / 1e9).toFixed(1)} GB here).` +
            (limit.unsupported && v.engine !== 'dense' ? ` The structured engine cannot take this run: ${limit.unsupported}.` : '')
          : `N = ${count} is above the structured limit of ${limit.maxN} elements (the truncated state alone is N × 2k numbers, k ≈ 2√N).`;
  }
  Object.assign(errors, subregionLightConeError(candidate.subregion));
  if (!parsed.success || Object.keys(errors).length > 0) return { ok: false, errors };
  return { ok: true, request: parsed.data };
}

/**
 * Field errors from a failed POST: schema issues (400) go beside their fields; a size refusal (422
 * too_large) beside N; other refusals stay as the form's message.
 */
export function serverFieldErrors(error: { code: string; message: string; issues: { path: string; message: string }[] }): FieldErrors {
  const errors: FieldErrors = {};
  for (const issue of error.issues) {
    const path = fieldForIssuePath(issue.path);
    if (!(path in errors)) errors[path] = issue.message;
  }
  if (error.code === 'too_large' && !errors['sprinkling.count']) errors['sprinkling.count'] = error.message;
  return errors;
}
