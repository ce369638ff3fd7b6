import type { CreateStudyRequestInput } from '@shared/studies';
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
import { defaultTruncationFor } from '@shared/vacuum';
import { defaultRestrictedCutForm, restrictedCutFromForm, type RestrictedCutFormValues } from '../../../lib/truncationForm';
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
  seedCount: string;
  seedPrefix: string;
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
  untruncated: boolean;
  doubleTruncated: boolean;
  /** the second cut of the double-truncated rule */
  restrictedCut: RestrictedCutFormValues;
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
  seedCount: '4',
  seedPrefix: 'seed',
  subregionKind: 'concentric',
  fractions: '0.4, 0.5, 0.6',
  pairSizes: '0.2',
  separations: '0.02, 0.05, 0.1, 0.2',
  renyi: '',
  elementLists: '',
  tips: defaultTips[2],
  untruncated: true,
  doubleTruncated: true,
  restrictedCut: { ...defaultRestrictedCutForm },
  mass: '0',
};

/**
 * The whole-region cut of the double-truncated rule: √N/(4π) in 2D (Sorkin–Yazdi 2018), the knee in 4D,
 * where √N/(4π) is not derived (shared/vacuum.ts ruleCautions).
 */
export function doubleTruncatedRuleLabel(dimension: 2 | 4, restrictedCut: RestrictedCutFormValues): string {
  const whole = dimension === 4 ? 'knee' : '√N/4π';
  const second = restrictedCut.kind === 'sqrtN' ? '√n/4π' : `λ = ${restrictedCut.value.trim() || '…'}`;
  return `Double-truncated (${whole}, then ${second})`;
}

/** "200, 400 800" → [200, 400, 800]; anything unreadable becomes NaN so the schema names the field. */
export function parseNumberList(text: string): number[] {
  return text
    .split(/[\s,;]+/)
    .filter((s) => s !== '')
    .map((s) => Number(s));
}

/** Seeds "<prefix>-1" … "<prefix>-k": readable in exports, distinct, reproducible. */
export function seedsFrom(prefix: string, count: number): string[] {
  const base = prefix.trim() || 'seed';
  return Array.from({ length: Math.max(0, Math.floor(count)) }, (_, k) => `${base}-${k + 1}`);
}

function parseTips(text: string) {
  return text
    .split('\n')
    .map((line) => line.trim())
    .filter((line) => line !== '')
    .map((line) => {
      const [past, future] = line.split(/\s+/);
      // "t,x" in 2D, "t,x,y,z" in 4D; the server checks the count against the region
      const tip = (s: string | undefined) => {
        const [t, x, y, z] = (s ?? '').split(',').map((v) => (v.trim() === '' ? Number.NaN : Number(v)));
        const plane = { t: t ?? Number.NaN, x: x ?? Number.NaN };
        return y === undefined && z === undefined ? plane : { ...plane, y: y ?? Number.NaN, z: z ?? Number.NaN };
      };
      return { past: tip(past), future: tip(future) };
    });
}

/** "0, 1, 2\n5 6 7" → [[0, 1, 2], [5, 6, 7]]; blank lines are skipped. */
export function parseElementLists(text: string): number[][] {
  return text
    .split('\n')
    .map((line) => line.trim())
    .filter((line) => line !== '')
    .map(parseNumberList);
}

function subregionsFrom(values: StudyFormValues): CreateStudyRequestInput['subregions'] {
  if (values.subregionKind === 'concentric') return { kind: 'concentric', fractions: parseNumberList(values.fractions) };
  if (values.subregionKind === 'pairs') return { kind: 'pairs', sizes: parseNumberList(values.pairSizes), separations: parseNumberList(values.separations) };
  if (values.subregionKind === 'elements') return { kind: 'elements', lists: parseElementLists(values.elementLists).map((indices) => ({ indices })) };
  return { kind: 'tips', diamonds: parseTips(values.tips) };
}

/**
 * The POST body for the form's values (validated afterwards with the shared schema). `dimension` is that
 * of the picked imported sets (a sprinkled study takes its region's). Rényi orders the field cannot read
 * are left out here: the page shows renyiOrdersFromText's message first.
 */
export function studyRequestFrom(values: StudyFormValues, importedDimension: 2 | 4 = 2): CreateStudyRequestInput {
  const dimension = values.source === 'imported' ? importedDimension : regionDimension(values.regionKind);
  const rules: CreateStudyRequestInput['rules'] = [];
  if (values.untruncated) rules.push({ truncation: { rule: 'none' }, doubleTruncation: false });
  if (values.doubleTruncated) {
    const restrictedCut = restrictedCutFromForm(true, values.restrictedCut) as CreateStudyRequestInput['rules'][number]['restrictedCut'];
    rules.push({ truncation: defaultTruncationFor(dimension), doubleTruncation: true, ...(restrictedCut ? { restrictedCut } : {}) });
  }
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
    seeds: seedsFrom(values.seedPrefix, Number(values.seedCount)),
    subregions: subregionsFrom(values),
    rules,
    mass: Number(values.mass),
    ...renyi,
  };
}

/** Which form field a request path belongs to, for showing server and schema messages in place. */
export function formFieldOf(path: string): keyof StudyFormValues | 'form' {
  if (path.startsWith('counts')) return 'counts';
  if (path.startsWith('causalSetIds')) return 'causalSetIds';
  if (path.startsWith('subregions.lists')) return 'elementLists';
  if (path.startsWith('seeds')) return 'seedCount';
  if (path.startsWith('subregions.fractions')) return 'fractions';
  if (path.startsWith('subregions.sizes')) return 'pairSizes';
  if (path.startsWith('subregions.separations')) return 'separations';
  if (path.startsWith('renyi')) return 'renyi';
  if (path.startsWith('subregions.diamonds')) return 'tips';
  if (path.startsWith('subregions')) return 'subregionKind';
  if (/^rules\.\d+\.restrictedCut/.test(path)) return 'restrictedCut';
  if (path.startsWith('rules')) return 'untruncated';
  // the slab's four ranges share one message, beside the first
  if (path.startsWith('region.t') || path.startsWith('region.x')) return 'tMin';
  const field = /^region\.(\w+)/.exec(path)?.[1];
  if (field && (regionFieldKeys as readonly string[]).includes(field)) return field as RegionFieldKey;
  if (path.startsWith('region')) return 'properTime';
  if (path.startsWith('mass')) return 'mass';
  if (path.startsWith('title')) return 'title';
  return 'form';
}
