import { numberedSeedRule, numberedSeeds, STUDY_MAX_RULES, type CreateStudyRequest, type CreateStudyRequestInput, type StudyRule } from '@shared/studies';
import {
  defaultRegionKind,
  regionDefaultSubDiamond,
  regionDescriptors,
  regionDimension,
  regionFieldDefaults,
  regionFromFieldText,
  regionFieldKeys,
  regionKindsOfDimension,
  regionSpecSchema,
  type DiamondTips,
  type Event,
  type RegionFieldKey,
  type RegionFieldValues,
  type RegionKind,
  type RegionSpec,
} from '@shared/regions';
import { defaultTruncationFor, renyiKey } from '@shared/vacuum';
import {
  defaultRestrictedCutForm,
  restrictedCutFromForm,
  restrictedCutToForm,
  truncationFromForm,
  truncationToForm,
  type RestrictedCutFormValues,
  type TruncationFormValues,
} from '../../../lib/truncationForm';
import { renyiOrdersFromText } from '../../../ui/RenyiOrdersField';

/** Whether concentric sub-diamonds (ℓ/T) or pairs on the central slice can be asked for on a kind: it needs a diamond of its own. */
export const offersConcentric = (kind: RegionKind): boolean => regionDescriptors[kind].ownDiamond !== undefined;

const tipText = (e: Event) => ('y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x]).join(',');
const tipsLine = ({ past, future }: DiamondTips) => `${tipText(past)} ${tipText(future)}`;

/** One line of tips per dimension: the default sub-diamond of the first kind of that dimension, at its defaults. */
function tipsOfDimension(dimension: 2 | 4): string {
  const kind = regionKindsOfDimension(dimension)[0]!;
  return tipsLine(regionDefaultSubDiamond(regionSpecSchema.parse(regionFromFieldText({ regionKind: kind, ...regionFieldDefaults() }))));
}

/**
 * The tips line of the region the form now describes, its own default sub-diamond (the registry's
 * `defaultSubDiamond`: a de Sitter diamond lies at η < 0), or null while its fields do not parse.
 */
export function tipsForStudyRegion(values: RegionFieldValues): string | null {
  const region = regionSpecSchema.safeParse(regionFromFieldText(values));
  return region.success ? tipsLine(regionDefaultSubDiamond(region.data)) : null;
}

/** Why a region offers the massless field only (the de Sitter kinds), or null. */
export const studyMasslessOnlyReason = (kind: RegionKind): string | null => regionDescriptors[kind].massiveField?.reason ?? null;

/** The sub-diamond tips the form starts from, per dimension. */
export const defaultTips = { 2: tipsOfDimension(2), 4: tipsOfDimension(4) } as const;

/** One cut rule of the study as the form edits it. */
export interface StudyRuleFormValues {
  /** the whole-region cut; null: the dimension's usual one (√N/4π in 2D, the knee in 4D), following the region */
  truncation: TruncationFormValues | null;
  doubleTruncation: boolean;
  /** the second cut, with double truncation */
  restrictedCut: RestrictedCutFormValues;
  /** the saved cut rule the truncation was copied from, while unchanged */
  presetId: string | null;
}

/** At most this many rules (the shared schema's limit). */
export const studyFormMaxRules = STUDY_MAX_RULES;

export const untruncatedRuleForm: StudyRuleFormValues = { truncation: { kind: 'none', value: '' }, doubleTruncation: false, restrictedCut: { ...defaultRestrictedCutForm }, presetId: null };
/** Sorkin–Yazdi double truncation at the dimension's usual whole-region cut. */
export const doubleTruncatedRuleForm: StudyRuleFormValues = { truncation: null, doubleTruncation: true, restrictedCut: { ...defaultRestrictedCutForm }, presetId: null };

/** The rule a row describes, unvalidated (the shared schema names a bad number at `rules.k.…`). */
export function studyRuleFromForm(rule: StudyRuleFormValues, dimension: 2 | 4): CreateStudyRequestInput['rules'][number] {
  const truncation = (rule.truncation ? truncationFromForm(rule.truncation) : defaultTruncationFor(dimension)) as StudyRule['truncation'];
  const restrictedCut = restrictedCutFromForm(rule.doubleTruncation, rule.restrictedCut) as StudyRule['restrictedCut'];
  return { truncation, doubleTruncation: rule.doubleTruncation, ...(restrictedCut ? { restrictedCut } : {}) };
}

/** What the study form edits, as text where people type lists. */
export interface StudyFormValues extends RegionFieldValues {
  title: string;
  /** sprinklings of ours, or imported causal sets in their place */
  source: 'sprinkled' | 'imported';
  /** the picked imported causal sets, in the order picked */
  causalSetIds: string[];
  process: 'fixed' | 'poisson';
  prng: 'arc4' | 'alea' | 'xor4096';
  counts: string;
  /** seeds numbered "<prefix>-1" … "<prefix>-k", or listed one by one (a study made through the API or extended by name) */
  seedMode: 'numbered' | 'listed';
  seedCount: string;
  seedPrefix: string;
  /** the listed seeds, comma- or line-separated */
  seedList: string;
  subregionKind: 'concentric' | 'pairs' | 'tips' | 'elements';
  fractions: string;
  /** pairs for the mutual information: ℓ/T of each of the two sub-diamonds, and the gaps d/T */
  pairSizes: string;
  separations: string;
  /** Rényi orders α as typed ("0.5, 2, inf"); blank for none */
  renyi: string;
  /** one element list per line: "0, 1, 2, …" (imported sets only) */
  elementLists: string;
  /** one sub-diamond per line: "t0,x0 t1,x1" */
  tips: string;
  /** the cut rules compared, one to four */
  rules: StudyRuleFormValues[];
  mass: string;
}

export const defaultStudyForm: StudyFormValues = {
  title: '',
  source: 'sprinkled',
  causalSetIds: [],
  regionKind: defaultRegionKind,
  ...regionFieldDefaults(),
  // a slab about the origin, so the default tips lie in it
  tMin: '-1',
  tMax: '1',
  xMin: '-1',
  xMax: '1',
  process: 'fixed',
  prng: 'arc4',
  counts: '200, 400, 800',
  seedMode: 'numbered',
  seedCount: '4',
  seedPrefix: 'seed',
  seedList: '',
  subregionKind: 'concentric',
  fractions: '0.4, 0.5, 0.6',
  pairSizes: '0.2',
  separations: '0.02, 0.05, 0.1, 0.2',
  renyi: '',
  elementLists: '',
  tips: defaultTips[2],
  rules: [untruncatedRuleForm, doubleTruncatedRuleForm],
  mass: '0',
};

/** "200, 400 800" → [200, 400, 800]; anything unreadable becomes NaN so the schema names the field. */
export function parseNumberList(text: string): number[] {
  return text
    .split(/[\s,;]+/)
    .filter((s) => s !== '')
    .map((s) => Number(s));
}

/** Seeds "<prefix>-1" … "<prefix>-k": readable in exports, distinct, reproducible. */
export function seedsFrom(prefix: string, count: number): string[] {
  return numberedSeeds(prefix, count);
}

/** "a, b\nc" → ["a", "b", "c"]: listed seeds, one per comma or line. */
export function parseSeedList(text: string): string[] {
  return text
    .split(/[\n,]/)
    .map((s) => s.trim())
    .filter((s) => s !== '');
}

/** The seeds the form's values name. */
export function seedsOfForm(values: Pick<StudyFormValues, 'seedMode' | 'seedPrefix' | 'seedCount' | 'seedList'>): string[] {
  return values.seedMode === 'listed' ? parseSeedList(values.seedList) : seedsFrom(values.seedPrefix, Number(values.seedCount));
}

/**
 * A subregion line may start with its name: "left: -0.5,0 0.5,0". Numbers never hold a colon, so the
 * name is whatever comes before the last one.
 */
function splitLabel(line: string): { label?: string; rest: string } {
  const colon = line.lastIndexOf(':');
  const label = colon > 0 ? line.slice(0, colon).trim() : '';
  return label ? { label, rest: line.slice(colon + 1).trim() } : { rest: colon === 0 ? line.slice(1).trim() : line };
}

const labelPrefix = (label: string | undefined) => (label ? `${label}: ` : '');

function parseTips(text: string) {
  return text
    .split('\n')
    .map((line) => line.trim())
    .filter((line) => line !== '')
    .map((line) => {
      const { label, rest } = splitLabel(line);
      const [past, future] = rest.split(/\s+/);
      // "t,x" in 2D, "t,x,y,z" in 4D; the server checks the count against the region
      const tip = (s: string | undefined) => {
        const [t, x, y, z] = (s ?? '').split(',').map((v) => (v.trim() === '' ? Number.NaN : Number(v)));
        const plane = { t: t ?? Number.NaN, x: x ?? Number.NaN };
        return y === undefined && z === undefined ? plane : { ...plane, y: y ?? Number.NaN, z: z ?? Number.NaN };
      };
      return { ...(label ? { label } : {}), past: tip(past), future: tip(future) };
    });
}

/** "0, 1, 2\n5 6 7" → [[0, 1, 2], [5, 6, 7]]; blank lines are skipped. */
export function parseElementLists(text: string): number[][] {
  return parseNamedElementLists(text).map((list) => list.indices);
}

/** Element lists with their names ("name: 0, 1, 2"), as the request takes them. */
function parseNamedElementLists(text: string): { label?: string; indices: number[] }[] {
  return text
    .split('\n')
    .map((line) => line.trim())
    .filter((line) => line !== '')
    .map((line) => {
      const { label, rest } = splitLabel(line);
      return { ...(label ? { label } : {}), indices: parseNumberList(rest) };
    });
}

function subregionsFrom(values: StudyFormValues): CreateStudyRequestInput['subregions'] {
  if (values.subregionKind === 'concentric') return { kind: 'concentric', fractions: parseNumberList(values.fractions) };
  if (values.subregionKind === 'pairs') return { kind: 'pairs', sizes: parseNumberList(values.pairSizes), separations: parseNumberList(values.separations) };
  if (values.subregionKind === 'elements') return { kind: 'elements', lists: parseNamedElementLists(values.elementLists) };
  return { kind: 'tips', diamonds: parseTips(values.tips) };
}

/**
 * The POST body for the form's values (validated afterwards with the shared schema). `dimension` is that
 * of the picked imported sets (a sprinkled study takes its region's). Rényi orders the field cannot read
 * are left out here: the page shows renyiOrdersFromText's message first.
 */
export function studyRequestFrom(values: StudyFormValues, importedDimension: 2 | 4 = 2): CreateStudyRequestInput {
  const dimension = values.source === 'imported' ? importedDimension : regionDimension(values.regionKind);
  const rules = values.rules.map((rule) => studyRuleFromForm(rule, dimension));
  const title = values.title.trim() ? { title: values.title.trim() } : {};
  const { orders } = renyiOrdersFromText(values.renyi);
  const renyi = orders ? { renyi: orders } : {};
  if (values.source === 'imported') {
    return { source: 'imported', ...title, causalSetIds: values.causalSetIds, subregions: subregionsFrom(values), rules, mass: Number(values.mass), ...renyi };
  }
  return {
    source: 'sprinkled',
    ...title,
    region: regionFromFieldText(values) as RegionSpec,
    process: values.process,
    prng: values.prng,
    counts: parseNumberList(values.counts),
    seeds: seedsOfForm(values),
    subregions: subregionsFrom(values),
    rules,
    mass: Number(values.mass),
    ...renyi,
  };
}

/** Which form field a request path belongs to, for showing server and schema messages in place. */
export function formFieldOf(path: string): keyof StudyFormValues | 'form' | `rules.${number}` {
  if (path.startsWith('counts')) return 'counts';
  if (path.startsWith('causalSetIds')) return 'causalSetIds';
  if (path.startsWith('subregions.lists')) return 'elementLists';
  if (path.startsWith('seeds')) return 'seedCount';
  const rule = /^rules\.(\d+)/.exec(path);
  if (rule) return `rules.${Number(rule[1])}`;
  if (path.startsWith('subregions.fractions')) return 'fractions';
  if (path.startsWith('subregions.sizes')) return 'pairSizes';
  if (path.startsWith('subregions.separations')) return 'separations';
  if (path.startsWith('renyi')) return 'renyi';
  if (path.startsWith('subregions.diamonds')) return 'tips';
  if (path.startsWith('subregions')) return 'subregionKind';
  if (path.startsWith('rules')) return 'rules';
  // the slab's four ranges share one message, beside the first
  if (path.startsWith('region.t') || path.startsWith('region.x')) return 'tMin';
  const field = /^region\.(\w+)/.exec(path)?.[1];
  if (field && (regionFieldKeys as readonly string[]).includes(field)) return field as RegionFieldKey;
  if (path.startsWith('region')) return 'properTime';
  if (path.startsWith('mass')) return 'mass';
  if (path.startsWith('title')) return 'title';
  return 'form';
}

const numberText = (v: number) => String(v);

/**
 * The form's values for a stored study request, so "Duplicate" opens the form with every setting of
 * the study: studyRequestFrom of the result is the request again (tests/client/studyFormFromRequest.test.ts).
 * The region fields of an imported study, which has none, keep the form's defaults.
 */
export function studyFormFromRequest(request: CreateStudyRequest): StudyFormValues {
  const base: StudyFormValues = { ...defaultStudyForm, title: request.title ?? '', mass: numberText(request.mass), renyi: (request.renyi ?? []).map(renyiKey).join(', ') };
  const rules = request.rules.map(
    (rule): StudyRuleFormValues => ({
      truncation: truncationToForm(rule.truncation),
      doubleTruncation: rule.doubleTruncation,
      restrictedCut: restrictedCutToForm(rule.restrictedCut),
      presetId: null,
    }),
  );
  const subregions = request.subregions;
  const subregionValues: Partial<StudyFormValues> =
    subregions.kind === 'concentric'
      ? { subregionKind: 'concentric', fractions: subregions.fractions.map(numberText).join(', ') }
      : subregions.kind === 'pairs'
        ? { subregionKind: 'pairs', pairSizes: subregions.sizes.map(numberText).join(', '), separations: subregions.separations.map(numberText).join(', ') }
        : subregions.kind === 'tips'
          ? { subregionKind: 'tips', tips: subregions.diamonds.map((d) => `${labelPrefix(d.label)}${tipsLine(d)}`).join('\n') }
          : { subregionKind: 'elements', elementLists: subregions.lists.map((l) => `${labelPrefix(l.label)}${l.indices.join(', ')}`).join('\n') };
  if (request.source === 'imported') {
    return { ...base, ...subregionValues, rules, source: 'imported', causalSetIds: [...request.causalSetIds] };
  }
  const region = request.region as RegionSpec & Record<string, number>;
  const regionFields = Object.fromEntries(regionDescriptors[region.kind].fields.map((key) => [key, numberText(region[key]!)]));
  const numbered = numberedSeedRule(request.seeds);
  return {
    ...base,
    ...subregionValues,
    rules,
    source: 'sprinkled',
    regionKind: region.kind,
    ...regionFields,
    process: request.process,
    prng: request.prng,
    counts: request.counts.map(numberText).join(', '),
    ...(numbered
      ? { seedMode: 'numbered' as const, seedPrefix: numbered.prefix, seedCount: String(numbered.count), seedList: '' }
      : { seedMode: 'listed' as const, seedList: request.seeds.join(', ') }),
  };
}
