import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { isPeriodicRegionKind } from '@shared/regions';
import type { RunDetail } from '@shared/runs';
import { useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useCutRules } from '../../cutRules/api/cutRules';
import { TruncationRuleFields } from '../../../ui/TruncationRuleFields';
import { useReanalyseRun } from '../api/runs';
import { useEngineLimits } from '../api/limits';
import { denseLimitN, reanalyseEngineNote } from '../lib/engineNotes';
import { initialReanalyseValues, reanalyseRequestFromForm, type ReanalyseFormValues } from '../lib/reanalyseForm';
import { showRunRequestError } from '../lib/showRequestError';
import { EngineFields } from './EngineFields';
import { DoubleTruncationFields, PairFields, SubregionFields } from './SubregionFields';

export function ReanalyseForm({ run, dimension }: { run: RunDetail; dimension: 2 | 4 }) {
  const [values, setValues] = useState(() => initialReanalyseValues(run.request));
  const [presetId, setPresetId] = useState<string | null>(null);
  const errors = useFormErrors();
  const reanalyse = useReanalyseRun(run.id);
  const cutRules = useCutRules();
  const navigate = useNavigate();
  const denseMaxN = useEngineLimits().data?.dense.maxN ?? denseLimitN;
  const stored = (run.request ?? {}) as { causalSet?: { kind?: string } };
  const reanalysed = {
    N: run.N ?? 0,
    dimension,
    periodic: isPeriodicRegionKind(run.regionKind),
    relationOnly: stored.causalSet?.kind === 'relations',
  };
  const set = <K extends keyof ReanalyseFormValues>(key: K, value: ReanalyseFormValues[K]) => setValues((v) => ({ ...v, [key]: value }));

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = reanalyseRequestFromForm(values, dimension);
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    reanalyse.mutate(checked.request, {
      onSuccess: ({ id }) => navigate(`/runs/${id}`),
      onError: (error) => showRunRequestError(errors, error),
    });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Re-analyse" className="flex max-w-3xl flex-col gap-6">
      <p className="text-sm text-ink-soft">
        The same points with another truncation, subregion, mass or engine, computed as a new run that links back to this one.
      </p>
      <TruncationRuleFields
        value={values.truncation}
        onChange={(t) => set('truncation', t)}
        errors={errors.fieldErrors}
        presets={cutRules.data ?? []}
        presetId={presetId}
        onPresetChange={setPresetId}
      />
      <div className="grid grid-cols-1 gap-6 sm:grid-cols-2">
        <TextField
          label="Mass m"
          name="reanalyseMass"
          inputMode="decimal"
          className="font-mono"
          value={values.mass}
          onChange={(e) => set('mass', e.target.value)}
          error={errors.fieldErrors.mass}
        />
        <TextField
          label="Title of the new run"
          name="reanalyseTitle"
          value={values.title}
          onChange={(e) => set('title', e.target.value)}
          error={errors.fieldErrors.title}
        />
      </div>
      <EngineFields
        name="reanalyseEngine"
        value={values.engine}
        onChange={(engine) => set('engine', engine)}
        error={errors.fieldErrors.engine}
        note={reanalyseEngineNote(values, reanalysed, denseMaxN)}
      />
      <SubregionFields
        dimension={dimension}
        enabled={values.withSubregion}
        onEnabledChange={(v) => set('withSubregion', v)}
        past={values.past}
        future={values.future}
        onTipChange={(which, tip) => set(which, tip)}
        errors={errors.fieldErrors}
        renyi={{ value: values.renyi ?? '', onChange: (text) => set('renyi', text) }}
        complement={{ checked: values.complement ?? false, onChange: (v) => set('complement', v) }}
      />
      <PairFields
        dimension={dimension}
        enabled={values.withPair ?? false}
        onEnabledChange={(v) => set('withPair', v)}
        a={values.pairA ?? initialReanalyseValues(null).pairA!}
        b={values.pairB ?? initialReanalyseValues(null).pairB!}
        onChange={(side, pair) => set(side === 'a' ? 'pairA' : 'pairB', pair)}
        errors={errors.fieldErrors}
      />
      {(values.withSubregion || Boolean(values.withPair)) && (
        <DoubleTruncationFields
          doubleTruncation={values.doubleTruncation}
          onDoubleTruncationChange={(v) => set('doubleTruncation', v)}
          restrictedCut={values.restrictedCut}
          onRestrictedCutChange={(v) => set('restrictedCut', v)}
          errors={errors.fieldErrors}
        />
      )}
      <FormError message={errors.formError} />
      <div>
        <Button type="submit" busy={reanalyse.isPending}>
          Re-analyse as a new run
        </Button>
      </div>
    </form>
  );
}
