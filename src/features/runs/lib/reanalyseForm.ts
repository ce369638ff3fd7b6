import type { EngineRequest } from '@shared/engineChoice';
import { reanalyseRunRequestSchema, type ReanalyseRunRequest } from '@shared/runs';
import type { RenyiOrder, RestrictedCut, TruncationRule } from '@shared/vacuum';
import type { FieldErrors } from '../../../lib/forms';
import {
  defaultTruncation,
  restrictedCutFromForm,
  restrictedCutToForm,
  truncationFromForm,
  truncationToForm,
  type RestrictedCutFormValues,
  type TruncationFormValues,
} from '../../../lib/truncationForm';
import {
  defaultRunForm,
  entropyExtrasFromForm,
  humanise,
  NumberReader,
  schemaErrors,
  subregionFromForm,
  subregionLightConeError,
  type Checked,
  type SubregionShapeValues,
  type TipValues,
} from './runForm';

/** The re-analysis form: another truncation, subregion, mass or title for the same points. */
export interface ReanalyseFormValues {
  title: string;
  mass: string;
  truncation: TruncationFormValues;
  withSubregion: boolean;
  past: TipValues;
  future: TipValues;
  doubleTruncation: boolean;
  restrictedCut: RestrictedCutFormValues;
  engine: EngineRequest;
  /** Rényi orders as typed; blank asks for none (absent: as blank) */
  renyi?: string;
  complement?: boolean;
  withPair?: boolean;
  pairA?: SubregionShapeValues;
  pairB?: SubregionShapeValues;
  /** what of these the parent asked for, so the body clears only what the form dropped and otherwise sends only changes */
  parentExtras?: { renyi: boolean; pair: boolean; complement: boolean };
}

type StoredDiamond = { kind: string; past?: Record<string, number>; future?: Record<string, number> };

interface StoredSettings {
  mass?: number;
  truncation?: TruncationRule;
  doubleTruncation?: boolean;
  restrictedCut?: RestrictedCut;
  engine?: EngineRequest;
  subregion?: StoredDiamond | null;
  renyi?: RenyiOrder[];
  complement?: boolean;
  mutualInformation?: { a: StoredDiamond; b: StoredDiamond };
}

function tipValues(tip: Record<string, number> | undefined, fallback: TipValues): TipValues {
  if (!tip) return fallback;
  return { t: String(tip.t ?? ''), x: String(tip.x ?? ''), y: String(tip.y ?? '0'), z: String(tip.z ?? '0') };
}

/** Starts from the run's own settings, so only what is changed differs in the new run. */
export function initialReanalyseValues(request: unknown): ReanalyseFormValues {
  const stored = (request ?? {}) as StoredSettings;
  const defaults = defaultRunForm('');
  const diamond = stored.subregion?.kind === 'diamond' ? stored.subregion : null;
  const pair = stored.mutualInformation?.a.kind === 'diamond' && stored.mutualInformation.b.kind === 'diamond' ? stored.mutualInformation : null;
  const side = (tips: StoredDiamond | undefined, fallback: SubregionShapeValues): SubregionShapeValues => ({
    past: tipValues(tips?.past, fallback.past),
    future: tipValues(tips?.future, fallback.future),
    elementList: '',
  });
  return {
    title: '',
    mass: String(stored.mass ?? 0),
    truncation: stored.truncation ? truncationToForm(stored.truncation) : { ...defaultTruncation },
    withSubregion: diamond !== null,
    past: tipValues(diamond?.past, defaults.past),
    future: tipValues(diamond?.future, defaults.future),
    doubleTruncation: stored.doubleTruncation ?? false,
    restrictedCut: restrictedCutToForm(stored.restrictedCut),
    engine: stored.engine ?? 'auto',
    renyi: (stored.renyi ?? []).map((order) => (order === 'inf' ? 'inf' : String(order))).join(', '),
    complement: stored.complement ?? false,
    withPair: pair !== null,
    pairA: side(pair?.a, defaults.pairA),
    pairB: side(pair?.b, defaults.pairB),
    parentExtras: { renyi: (stored.renyi ?? []).length > 0, pair: pair !== null, complement: stored.complement === true },
  };
}

export function reanalyseRequestFromForm(v: ReanalyseFormValues, dimension: 2 | 4): Checked<ReanalyseRunRequest> {
  const reader = new NumberReader();
  const candidate: Record<string, unknown> = {
    mass: reader.read(v.mass, 'mass') ?? 0,
    truncation: truncationFromForm(v.truncation),
    subregion: v.withSubregion ? subregionFromForm(reader, { ...defaultRunForm(''), ...v }, dimension) : null,
    doubleTruncation: (v.withSubregion || Boolean(v.withPair)) && v.doubleTruncation,
    // null: the default √n/(4π), so a parent's fixed λ does not carry over once the form shows √n/(4π)
    restrictedCut: (v.withSubregion || Boolean(v.withPair)) && v.doubleTruncation ? (restrictedCutFromForm(true, v.restrictedCut) ?? null) : undefined,
    engine: v.engine,
  };
  const formErrors: FieldErrors = {};
  const defaults = defaultRunForm('');
  const extras = entropyExtrasFromForm(
    { withSubregion: v.withSubregion, renyi: v.renyi ?? '', complement: v.complement ?? false, withPair: v.withPair ?? false, pairA: v.pairA ?? defaults.pairA, pairB: v.pairB ?? defaults.pairB },
    reader,
    dimension,
    formErrors,
  );
  // the form shows every setting: what it dropped of the parent's is cleared, not carried over
  const parent = v.parentExtras ?? { renyi: false, pair: false, complement: false };
  if (extras.renyi) candidate.renyi = extras.renyi;
  else if (parent.renyi) candidate.renyi = null;
  if (extras.mutualInformation) candidate.mutualInformation = extras.mutualInformation;
  else if (parent.pair) candidate.mutualInformation = null;
  if (extras.complement) candidate.complement = true;
  else if (parent.complement) candidate.complement = false;
  if (v.title.trim()) candidate.title = v.title.trim();
  const parsed = reanalyseRunRequestSchema.safeParse(candidate);
  const errors: FieldErrors = { ...(parsed.success ? {} : humanise(schemaErrors(parsed.error.issues))), ...reader.errors, ...formErrors };
  if (candidate.subregion) Object.assign(errors, subregionLightConeError(candidate.subregion));
  if (!parsed.success || Object.keys(errors).length > 0) return { ok: false, errors };
  return { ok: true, request: parsed.data };
}
