import { useState, type FormEvent, type ReactNode } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import type { RunDetail } from '@shared/runs';
import { isApiError } from '../../../lib/apiClient';
import { useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, SelectField, TextField } from '../../../ui/Field';
import { PageHeader } from '../../../ui/Page';
import { RegionFields } from '../../../ui/RegionFields';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { useCausalSets } from '../../causalSets/api/causalSets';
import { CausalSetPicker } from '../../../ui/CausalSetPicker';
import { useCutRules } from '../../cutRules/api/cutRules';
import { TruncationRuleFields } from '../../../ui/TruncationRuleFields';
import { STRUCTURED_MAX_N_2D } from '@shared/engineChoice';
import { useEngineLimits } from '../api/limits';
import { useCreateRun, useRun } from '../api/runs';
import { EngineFields } from '../components/EngineFields';
import { DoubleTruncationFields, PairFields, SubregionFields } from '../components/SubregionFields';
import { denseLimitN, denseLimits, engineNote, sizeHint } from '../lib/engineNotes';
import {
  defaultRunForm,
  horizonTipsForRegion,
  masslessOnlyReason,
  newSeed,
  regionDimension,
  runFormForCausalSet,
  runFormFromRequest,
  runRequestFromForm,
  type StoredRunSettings,
  tipsForRegion,
  truncationForRegionChange,
  type PickedCausalSet,
  type RunFormValues,
} from '../lib/runForm';
import { showRunRequestError } from '../lib/showRequestError';

function FormSection({ title, note, children }: { title: string; note?: ReactNode; children: ReactNode }) {
  return (
    <section className="grid grid-cols-1 gap-4 border-t border-rule pt-5 pb-8 md:grid-cols-[12rem_1fr] md:gap-10">
      <div>
        <h2 className="text-sm font-semibold uppercase tracking-[0.12em] text-ink-soft">{title}</h2>
        {note && <p className="mt-1 text-xs text-ink-faint">{note}</p>}
      </div>
      <div className="flex flex-col gap-6">{children}</div>
    </section>
  );
}

export function NewRunPage() {
  const canCompute = useCan('compute');
  if (!canCompute) {
    return (
      <>
        <PageHeader title="New run" />
        <Empty>
          Viewers read and export runs but do not start them. Ask an owner of the team for the researcher role.{' '}
          <Link to="/runs" className="text-accent hover:underline">
            Back to the runs
          </Link>
        </Empty>
      </>
    );
  }
  return <NewRunStart />;
}

/**
 * Where the form starts: empty; a run's settings (`?from=<runId>`, "Open in the new-run form"); or one
 * imported causal set picked (`?causalSet=<id>`, from the set's page).
 */
function NewRunStart() {
  const [params] = useSearchParams();
  const from = params.get('from');
  const causalSetId = params.get('causalSet');
  if (from) return <NewRunFromRun key={from} runId={from} />;
  if (causalSetId) return <NewRunOnCausalSet key={causalSetId} causalSetId={causalSetId} />;
  return <NewRunForm initial={defaultRunForm()} />;
}

function NewRunFromRun({ runId }: { runId: string }) {
  const run = useRun(runId);
  if (run.isPending) return <Loading label="Loading the run’s settings" />;
  if (run.isError) {
    if (!isApiError(run.error, 404)) return <ErrorState error={run.error} onRetry={() => run.refetch()} />;
    return (
      <>
        <PageHeader title="New run" />
        <Empty>
          No run {runId.slice(0, 8)} in the current team to take the settings from.{' '}
          <Link to="/runs/new" className="text-accent hover:underline">
            Start from the defaults
          </Link>
        </Empty>
      </>
    );
  }
  return <NewRunForm initial={runFormFromRequest(run.data.request as StoredRunSettings)} from={run.data} />;
}

function NewRunOnCausalSet({ causalSetId }: { causalSetId: string }) {
  const causalSets = useCausalSets();
  if (causalSets.isPending) return <Loading label="Loading the imported causal sets" />;
  if (causalSets.isError) return <ErrorState error={causalSets.error} onRetry={() => causalSets.refetch()} />;
  const set = causalSets.data.items.find((c) => c.id === causalSetId);
  // a set that is gone leaves the picker empty, with its message at submit
  return <NewRunForm initial={set ? runFormForCausalSet(set) : { ...defaultRunForm(), source: 'imported' }} />;
}

/** What the form says when it holds another run's settings. */
function FromRunNote({ run }: { run: RunDetail }) {
  const reanalysis = Boolean((run.request as { reusedPoints?: unknown } | null)?.reusedPoints);
  return (
    <p className="mb-6 max-w-4xl border-l-2 border-accent pl-3 text-sm text-ink-soft" data-testid="from-run-note">
      Every setting of{' '}
      <Link to={`/runs/${run.id}`} className="text-accent hover:underline">
        run {run.title ? `${run.title} (${run.id.slice(0, 8)})` : run.id.slice(0, 8)}
      </Link>
      {reanalysis ? ', on the sprinkling its parent was made from (the same seed gives the same points)' : ''}. Change what you like, then start it
      as a new run.
    </p>
  );
}

function NewRunForm({ initial, from }: { initial: RunFormValues; from?: RunDetail }) {
  const [values, setValues] = useState<RunFormValues>(initial);
  const [presetId, setPresetId] = useState<string | null>(null);
  const errors = useFormErrors();
  const createRun = useCreateRun();
  const cutRules = useCutRules();
  const engineLimits = useEngineLimits().data;
  const limits = engineLimits?.dense;
  const structuredMaxN = engineLimits?.structured.maxN ?? STRUCTURED_MAX_N_2D;
  const navigate = useNavigate();
  const fe = errors.fieldErrors;
  const causalSets = useCausalSets();
  const pickedSet = causalSets.data?.items.find((c) => c.id === values.causalSetId) ?? null;
  const picked: PickedCausalSet | null = pickedSet ? { id: pickedSet.id, kind: pickedSet.kind, dimension: pickedSet.dimension, N: pickedSet.N } : null;
  const imported = values.source === 'imported';
  const dimension = imported ? (picked?.dimension ?? 2) : regionDimension(values.regionKind);
  // tips need coordinates; a relation list takes its subregion as element labels only
  const subregionBy = imported && (values.subregionBy === 'elements' || picked?.kind === 'relations') ? 'elements' : 'tips';

  function set<K extends keyof RunFormValues>(key: K, value: RunFormValues[K]) {
    setValues((v) => ({ ...v, [key]: value }));
  }

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = runRequestFromForm(values, limits?.maxN, picked);
    if (!checked.ok) {
      errors.setFieldErrors(checked.errors);
      errors.setFormError('Some settings need a look; see the messages beside the fields.');
      return;
    }
    createRun.mutate(checked.request, {
      onSuccess: ({ id }) => navigate(`/runs/${id}`),
      onError: (error) => showRunRequestError(errors, error),
    });
  }

  return (
    <>
      <PageHeader
        title="New run"
        context="Sprinkle a causal set or take an imported one, build its SJ state and, if asked, the entropy of a subregion. Units: c = 1."
      />
      {from && <FromRunNote run={from} />}
      <form onSubmit={submit} noValidate aria-label="New run" className="max-w-4xl">
        <FormSection title="Causal set" note="Ours, sprinkled from a seed, or one the team imported.">
          <fieldset className="flex flex-wrap gap-x-6 gap-y-2 text-sm">
            <legend className="sr-only">Where the causal set comes from</legend>
            <label className="flex items-center gap-2">
              <input type="radio" name="source" value="sprinkle" checked={!imported} onChange={() => set('source', 'sprinkle')} className="size-4 accent-accent" />
              Sprinkle one
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="source" value="imported" checked={imported} onChange={() => set('source', 'imported')} className="size-4 accent-accent" />
              Use an imported causal set
            </label>
          </fieldset>
          {imported && (
            <CausalSetPicker selected={values.causalSetId ? [values.causalSetId] : []} onChange={(ids) => set('causalSetId', ids[0] ?? '')} error={fe.causalSetId ?? fe.sprinkling} />
          )}
        </FormSection>

        {!imported && (
        <>
        <FormSection title="Region" note="Where the points are sprinkled.">
          <div className="grid grid-cols-1 gap-6 sm:grid-cols-3">
            <RegionFields
              values={values}
              onKindChange={(regionKind) =>
                setValues((v) => ({
                  ...v,
                  regionKind,
                  truncation: truncationForRegionChange(v.truncation, v.regionKind, regionKind),
                  // the tips follow the region: its own default sub-diamond and the pair beside it
                  ...(tipsForRegion({ ...v, regionKind }) ?? {}),
                  ...(masslessOnlyReason(regionKind) ? { mass: '0' } : {}),
                }))
              }
              onFieldChange={(key, text) => set(key, text)}
              kindError={fe['sprinkling.region']}
              fieldError={(key) => fe[`sprinkling.region.${key}`]}
            />
          </div>
        </FormSection>

        <FormSection
          title="Sprinkling"
          note={
            <>
              {limits ? (
                <>
                  This server’s dense engine takes at most <span className="figures">{limits.maxN}</span> elements
                  {limits.backend === 'native' ? (
                    ' (native LAPACK backend)'
                  ) : (
                    <>
                      {' '}
                      (JavaScript backend; the native one takes <span className="figures">{limits.byBackend.native}</span>)
                    </>
                  )}
                  : it holds about seven N×N matrices at once. The structured engine takes 2D cut runs up to{' '}
                  <span className="figures">{structuredMaxN}</span>.
                </>
              ) : (
                <>
                  The dense engine takes at most <span className="figures">{denseLimits.native}</span> elements with the
                  native backend, <span className="figures">{denseLimits['ml-matrix']}</span> without: it holds about seven
                  N×N matrices at once. The structured engine takes 2D cut runs up to{' '}
                  <span className="figures">{structuredMaxN}</span>.
                </>
              )}
            </>
          }
        >
          <div className="grid grid-cols-1 gap-6 sm:grid-cols-3">
            <SelectField
              label="Process"
              name="process"
              value={values.process}
              onChange={(e) => {
                const process = e.target.value as RunFormValues['process'];
                setValues((v) => ({ ...v, process, sizeBy: process === 'fixed' ? 'count' : v.sizeBy }));
              }}
              hint={values.process === 'fixed' ? 'Exactly N points; ρ = N/V.' : 'N ~ Poisson(ρV).'}
            >
              <option value="fixed">Fixed N</option>
              <option value="poisson">Poisson</option>
            </SelectField>
            {values.process === 'poisson' && (
              <SelectField
                label="Size given by"
                name="sizeBy"
                value={values.sizeBy}
                onChange={(e) => set('sizeBy', e.target.value as RunFormValues['sizeBy'])}
              >
                <option value="count">Expected N</option>
                <option value="density">Density ρ</option>
              </SelectField>
            )}
            {values.sizeBy === 'count' || values.process === 'fixed' ? (
              <TextField
                label={values.process === 'fixed' ? 'N (elements)' : 'Expected N'}
                name="count"
                inputMode="numeric"
                className="font-mono"
                value={values.count}
                onChange={(e) => set('count', e.target.value)}
                error={fe['sprinkling.count']}
                hint={sizeHint(values, limits?.maxN ?? denseLimitN)}
              />
            ) : (
              <TextField
                label="Density ρ"
                name="density"
                inputMode="decimal"
                className="font-mono"
                value={values.density}
                onChange={(e) => set('density', e.target.value)}
                error={fe['sprinkling.density'] ?? fe['sprinkling.count']}
                hint="Elements per unit spacetime volume."
              />
            )}
          </div>
          <div className="grid grid-cols-1 items-end gap-6 sm:grid-cols-3">
            <div className="flex items-end gap-3 sm:col-span-2">
              <div className="flex-1">
                <TextField
                  label="Seed"
                  name="seed"
                  className="font-mono"
                  value={values.seed}
                  onChange={(e) => set('seed', e.target.value)}
                  error={fe['sprinkling.seed']}
                  hint="The same seed and settings give the same points."
                />
              </div>
              <Button variant="quiet" className="mb-5" onClick={() => set('seed', newSeed())}>
                New seed
              </Button>
            </div>
            <SelectField
              label="Generator"
              name="prng"
              value={values.prng}
              onChange={(e) => set('prng', e.target.value as RunFormValues['prng'])}
              hint="seedrandom's PRNGs."
            >
              <option value="arc4">arc4 (default)</option>
              <option value="alea">alea</option>
              <option value="xor4096">xor4096</option>
            </SelectField>
          </div>
        </FormSection>

        </>
        )}

        <FormSection title="Field" note="A free scalar field.">
          <div className="grid grid-cols-1 gap-6 sm:grid-cols-3">
            <TextField
              label="Mass m"
              name="mass"
              inputMode="decimal"
              className="font-mono"
              value={values.mass}
              onChange={(e) => set('mass', e.target.value)}
              error={fe.mass}
              disabled={!imported && masslessOnlyReason(values.regionKind) !== null}
              hint={!imported && masslessOnlyReason(values.regionKind) ? `Massless only here: ${masslessOnlyReason(values.regionKind)}` : '0 for the massless field.'}
            />
          </div>
        </FormSection>

        <FormSection title="Truncation" note="Which modes of iΔ the SJ state keeps. A modelling choice: it shapes every number downstream.">
          <TruncationRuleFields
            value={values.truncation}
            onChange={(truncation) => set('truncation', truncation)}
            errors={fe}
            presets={cutRules.data ?? []}
            presetId={presetId}
            onPresetChange={setPresetId}
          />
        </FormSection>

        <FormSection title="Engine" note={engineLimits?.rule ?? 'Auto follows the documented rule; forcing one engine is for comparisons.'}>
          <EngineFields
            name="engine"
            value={values.engine}
            onChange={(engine) => set('engine', engine)}
            error={fe.engine}
            note={engineNote(values, limits?.maxN ?? denseLimitN, picked)}
          />
        </FormSection>

        <FormSection title="Subregion" note="Optional.">
          {imported && values.withSubregion && (
            <SelectField
              label="Subregion given by"
              name="subregionBy"
              value={subregionBy}
              onChange={(e) => set('subregionBy', e.target.value as RunFormValues['subregionBy'])}
              hint={picked?.kind === 'relations' ? 'A relation list has no coordinates: list its elements.' : 'Tips need the set’s coordinates; labels count from 0.'}
            >
              <option value="tips" disabled={picked?.kind === 'relations'}>
                Diamond by its tips
              </option>
              <option value="elements">List of elements</option>
            </SelectField>
          )}
          <SubregionFields
            dimension={dimension}
            enabled={values.withSubregion}
            onEnabledChange={(v) => set('withSubregion', v)}
            past={values.past}
            future={values.future}
            onTipChange={(which, tip) => set(which, tip)}
            errors={fe}
            elements={
              subregionBy === 'elements'
                ? { value: values.elementList, onChange: (text) => set('elementList', text), count: picked?.N ?? null, error: fe['subregion.indices'] }
                : undefined
            }
            renyi={{ value: values.renyi, onChange: (text) => set('renyi', text) }}
            onHorizonPart={!imported && horizonTipsForRegion(values) ? () => setValues((v) => ({ ...v, ...(horizonTipsForRegion(v) ?? {}) })) : undefined}
            complement={{ checked: values.complement, onChange: (v) => set('complement', v) }}
          />
        </FormSection>

        <FormSection title="Mutual information" note="Optional. Two subregions on the same state.">
          <PairFields
            dimension={dimension}
            enabled={values.withPair}
            onEnabledChange={(v) => set('withPair', v)}
            a={values.pairA}
            b={values.pairB}
            onChange={(side, pair) => set(side === 'a' ? 'pairA' : 'pairB', pair)}
            errors={fe}
            byElements={subregionBy === 'elements' || (imported && picked?.kind === 'relations') ? { count: picked?.N ?? null } : undefined}
          />
        </FormSection>

        <FormSection title="Entropy cut" note="For the subregion and the pair.">
          {values.withSubregion || values.withPair ? (
            <DoubleTruncationFields
              doubleTruncation={values.doubleTruncation}
              onDoubleTruncationChange={(v) => set('doubleTruncation', v)}
              restrictedCut={values.restrictedCut}
              onRestrictedCutChange={(v) => set('restrictedCut', v)}
              errors={fe}
            />
          ) : (
            <p className="text-sm text-ink-soft">Ask for a subregion or a pair to choose double truncation.</p>
          )}
        </FormSection>

        <FormSection title="Title" note="Optional; shown in the runs table and the e-mail.">
          <TextField
            label="Title"
            name="title"
            value={values.title}
            onChange={(e) => set('title', e.target.value)}
            error={fe.title}
            maxLength={200}
          />
        </FormSection>

        <div className="flex flex-col gap-4 border-t border-rule pt-6">
          <FormError message={errors.formError} />
          <div className="flex items-center gap-4">
            <Button type="submit" busy={createRun.isPending}>
              Start run
            </Button>
            <Link to="/runs" className="text-sm text-ink-soft hover:text-ink">
              Cancel
            </Link>
          </div>
        </div>
      </form>
    </>
  );
}
