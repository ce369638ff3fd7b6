import type { EngineRequest } from '@shared/engineChoice';
import { reanalyseRunRequestSchema, type ReanalyseRunRequest } from '@shared/runs';
import type { RestrictedCut, TruncationRule } from '@shared/vacuum';
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
  humanise,
  NumberReader,
  schemaErrors,
  subregionFromForm,
  subregionLightConeError,
  type Checked,
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
}

interface StoredSettings {
  mass?: number;
  truncation?: TruncationRule;
  doubleTruncation?: boolean;
  restrictedCut?: RestrictedCut;
  engine?: EngineRequest;
  subregion?: { kind: string; past?: Record<string, number>; future?: Record<string, number> } | null;
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
  };
}

export function reanalyseRequestFromForm(v: ReanalyseFormValues, dimension: 2 | 4): Checked<ReanalyseRunRequest> {
  const reader = new NumberReader();
  const candidate: Record<string, unknown> = {
    mass: reader.read(v.mass, 'mass') ?? 0,
    truncation: truncationFromForm(v.truncation),
    subregion: v.withSubregion ? subregionFromForm(reader, { ...defaultRunForm(''), ...v }, dimension) : null,
    doubleTruncation: v.withSubregion && v.doubleTruncation,
    // null: the default √n/(4π), so a parent's fixed λ does not carry over once the form shows √n/(4π)
    restrictedCut: v.withSubregion && v.doubleTruncation ? (restrictedCutFromForm(true, v.restrictedCut) ?? null) : undefined,
    engine: v.engine,
  };
  if (v.title.trim()) candidate.title = v.title.trim();
  const parsed = reanalyseRunRequestSchema.safeParse(candidate);
  const errors: FieldErrors = { ...(parsed.success ? {} : humanise(schemaErrors(parsed.error.issues))), ...reader.errors };
  if (candidate.subregion) Object.assign(errors, subregionLightConeError(candidate.subregion));
  if (!parsed.success || Object.keys(errors).length > 0) return { ok: false, errors };
  return { ok: true, request: parsed.data };
}
