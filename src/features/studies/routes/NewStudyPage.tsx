import { useEffect, useState, type FormEvent } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { createStudyRequestSchema, STUDY_MAX_CELLS, STUDY_MIN_SUBREGION_ELEMENTS } from '@shared/studies';
import { isApiError } from '../../../lib/apiClient';
import { validate } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, SelectField, TextField } from '../../../ui/Field';
import { PageHeader, Section } from '../../../ui/Page';
import { useCan } from '../../../lib/permissions';
import { CausalSetPicker } from '../../../ui/CausalSetPicker';
import { useCausalSets } from '../../causalSets/api/causalSets';
import { useCutRules } from '../../cutRules/api/cutRules';
import { regionDescriptors, regionDimension, regionLabels, type RegionFieldWording, type RegionKind } from '@shared/regions';
import { RegionFields } from '../../../ui/RegionFields';
import { RenyiOrdersField, renyiOrdersFromText } from '../../../ui/RenyiOrdersField';
import { useCreateStudy, useStudy } from '../api/studies';
import { StudyRuleRows } from '../components/StudyRuleRows';
import {
  defaultStudyForm,
  defaultTips,
  formFieldOf,
  offersConcentric,
  parseNumberList,
  seedsOfForm,
  studyFormFromRequest,
  studyMasslessOnlyReason,
  studyRequestFrom,
  tipsForStudyRegion,
  type StudyFormValues,
} from '../lib/studyForm';

/** The study's words for the region fields: L is the proper time the fractions ℓ/T refer to. */
const studyRegionWording: RegionFieldWording = {
  properTime: { label: 'Diamond proper time L', hint: (kind) => `${regionLabels[kind]}, tips at t = ±L/2` },
  circumference: { hint: 'x is periodic with this period' },
};

/**
 * The study form: a grid of N × subregions × seeds × rules on a sprinkled region (2D or 4D diamond,
 * cylinder diamond or 2D slab), or the same over imported causal sets, each set standing for one
 * (N, seed) sprinkling.
 */
export function NewStudyPage() {
  const [values, setValues] = useState<StudyFormValues>(defaultStudyForm);
  // "Duplicate" on a study page opens /studies/new?from=<id>: every setting of that study, to change and start anew
  const [searchParams] = useSearchParams();
  const fromId = searchParams.get('from') ?? '';
  const source = useStudy(fromId, { enabled: fromId !== '' });
  const [copiedFrom, setCopiedFrom] = useState<string | null>(null);
  const cutRules = useCutRules();
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const create = useCreateStudy();
  const navigate = useNavigate();
  const canCompute = useCan('compute');
  const set = <K extends keyof StudyFormValues>(key: K, value: StudyFormValues[K]) => setValues((v) => ({ ...v, [key]: value }));
  const causalSets = useCausalSets();
  // the picked imported sets decide the dimension of an imported study (and with it the 4D rule)
  const importedDimension: 2 | 4 = (causalSets.data?.items ?? []).some((c) => values.causalSetIds.includes(c.id) && c.dimension === 4) ? 4 : 2;
  const dimension = values.source === 'imported' ? importedDimension : regionDimension(values.regionKind);
  // a slab has no diamond to share a centre with; untouched tips follow the region's dimension
  const chooseRegion = (regionKind: RegionKind) =>
    setValues((v) => ({
      ...v,
      regionKind,
      subregionKind: !offersConcentric(regionKind) && (v.subregionKind === 'concentric' || v.subregionKind === 'pairs') ? 'tips' : v.subregionKind,
      // untouched tips follow the region's own default sub-diamond (a de Sitter diamond lies at η < 0)
      tips: v.tips === defaultTips[regionDimension(v.regionKind)] || v.tips === tipsForStudyRegion(v) ? (tipsForStudyRegion({ ...v, regionKind }) ?? v.tips) : v.tips,
      ...(studyMasslessOnlyReason(regionKind) ? { mass: '0' } : {}),
    }));

  useEffect(() => {
    if (!source.data || copiedFrom === source.data.id) return;
    const parsed = createStudyRequestSchema.safeParse(source.data.request);
    if (parsed.success) {
      setValues(studyFormFromRequest(parsed.data));
      setCopiedFrom(source.data.id);
    }
  }, [source.data, copiedFrom]);

  const counts = parseNumberList(values.counts).filter(Number.isFinite);
  const seedCount = values.seedMode === 'listed' ? seedsOfForm(values).length : Math.max(0, Math.floor(Number(values.seedCount) || 0));
  const cells = values.source === 'imported' ? values.causalSetIds.length : counts.length * seedCount;

  function place(issues: { path: string; message: string }[]) {
    const next: Record<string, string> = {};
    for (const issue of issues) {
      const field = formFieldOf(issue.path);
      if (!(field in next)) next[field] = issue.message;
    }
    setErrors(next);
  }

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    const renyi = renyiOrdersFromText(values.renyi);
    if (renyi.error) {
      setErrors({ renyi: renyi.error });
      return;
    }
    const body = studyRequestFrom(values, importedDimension);
    const checked = validate(createStudyRequestSchema, body);
    if (!checked.ok) {
      place(Object.entries(checked.errors).map(([path, message]) => ({ path, message })));
      return;
    }
    setErrors({});
    try {
      const { id } = await create.mutateAsync(body);
      navigate(`/studies/${id}`);
    } catch (error) {
      if (isApiError(error) && error.issues.length > 0) place(error.issues);
      else if (isApiError(error) && error.code === 'too_large') setErrors({ counts: error.message });
      setFormError(error instanceof Error ? error.message : 'The study could not be started.');
    }
  }

  if (!canCompute) {
    return (
      <>
        <PageHeader title="New study" />
        <p className="text-sm text-ink-soft">Viewers read and export studies; ask an owner for the researcher role to start one.</p>
      </>
    );
  }

  return (
    <>
      <PageHeader
        title="New study"
        context="One sprinkling per N and seed serves every subregion and cut rule. Results arrive cell by cell."
        actions={
          <Link to="/studies" className="text-sm text-accent hover:underline">
            All studies
          </Link>
        }
      />
      {fromId !== '' && (
        <p className="mb-6 max-w-3xl text-sm text-ink-soft" data-testid="copied-from">
          {source.isError
            ? 'The study to copy could not be loaded; the form starts from its defaults.'
            : copiedFrom
              ? <>Every setting is copied from <Link to={`/studies/${copiedFrom}`} className="text-accent hover:underline">{source.data?.title || `study ${copiedFrom.slice(0, 8)}`}</Link>; change what you like and start it as a new study.</>
              : 'Copying the settings of the study…'}
        </p>
      )}
      <form onSubmit={submit} noValidate className="flex max-w-3xl flex-col">
        <Section title="Study">
          <TextField label="Title" name="title" value={values.title} onChange={(e) => set('title', e.target.value)} error={errors.title} placeholder="e.g. area law in the 2D diamond" />
        </Section>

        <Section title="Causal sets">
          <fieldset className="mb-5 flex flex-wrap gap-x-6 gap-y-2 text-sm">
            <legend className="sr-only">Source of the causal sets</legend>
            <label className="flex items-center gap-2">
              <input type="radio" name="source" value="sprinkled" checked={values.source === 'sprinkled'} onChange={() => setValues((v) => ({ ...v, source: 'sprinkled', subregionKind: v.subregionKind === 'elements' ? 'concentric' : v.subregionKind }))} className="accent-accent" />
              sprinkle, one per N and seed
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="source" value="imported" checked={values.source === 'imported'} onChange={() => set('source', 'imported')} className="accent-accent" />
              use imported causal sets
            </label>
          </fieldset>
          {values.source === 'imported' ? (
            <>
              <CausalSetPicker multiple selected={values.causalSetIds} onChange={(ids) => set('causalSetIds', ids)} error={errors.causalSetIds} />
              <p className="mt-3 text-xs text-ink-soft">
                <span className="figures">{cells}</span> causal set{cells === 1 ? '' : 's'} picked (at most {STUDY_MAX_CELLS}). Each plays the part of one sprinkling with its own N; sets of equal N form the ensemble of that N.
              </p>
            </>
          ) : (
            <>
          <div className="mb-6 grid grid-cols-1 gap-6 sm:grid-cols-3">
            <RegionFields
              values={values}
              onKindChange={chooseRegion}
              onFieldChange={(key, text) => set(key, text)}
              // a message about the region as a whole is filed under properTime (formFieldOf) and shown at its refinement field
              fieldError={(key) => errors[key] ?? (key === regionDescriptors[values.regionKind].refinementField ? errors.properTime : undefined)}
              wording={studyRegionWording}
            />
          </div>
          <div className="grid grid-cols-1 gap-6 sm:grid-cols-3">
            <SelectField label="Sprinkling" name="process" value={values.process} onChange={(e) => set('process', e.target.value as StudyFormValues['process'])}>
              <option value="fixed">fixed N</option>
              <option value="poisson">Poisson, mean N</option>
            </SelectField>
            <SelectField label="Generator" name="prng" value={values.prng} onChange={(e) => set('prng', e.target.value as StudyFormValues['prng'])}>
              <option value="arc4">seedrandom arc4</option>
              <option value="alea">seedrandom alea</option>
              <option value="xor4096">seedrandom xor4096</option>
            </SelectField>
            <TextField label="N values" name="counts" className="font-mono" value={values.counts} onChange={(e) => set('counts', e.target.value)} error={errors.counts} hint="comma-separated, at least 20 each" />
            {values.seedMode === 'listed' ? (
              <div className="sm:col-span-2">
                <TextField label="Seeds" name="seedList" className="font-mono" value={values.seedList} onChange={(e) => set('seedList', e.target.value)} error={errors.seedCount} hint={<>each N is sprinkled with each seed listed (comma-separated).{' '}<button type="button" className="text-accent hover:underline" onClick={() => setValues((v) => ({ ...v, seedMode: 'numbered', seedCount: String(seedsOfForm(v).length || 4) }))}>Number them instead</button></>} />
              </div>
            ) : (
              <>
                <TextField label="Seeds per N" name="seedCount" inputMode="numeric" value={values.seedCount} onChange={(e) => set('seedCount', e.target.value)} error={errors.seedCount} hint="ensemble size; 3 or more give error bars" />
                <TextField label="Seed prefix" name="seedPrefix" className="font-mono" value={values.seedPrefix} onChange={(e) => set('seedPrefix', e.target.value)} hint={`each N is sprinkled with the seeds ${values.seedPrefix || 'seed'}-1, ${values.seedPrefix || 'seed'}-2, … ${values.seedPrefix || 'seed'}-${seedCount || 'k'}`} />
              </>
            )}
          </div>
          <p className="mt-3 text-xs text-ink-soft">
            <span className="figures">{cells}</span> sprinkling{cells === 1 ? '' : 's'} (at most {STUDY_MAX_CELLS}). Each costs one dense eigendecomposition of N × N.
          </p>
            </>
          )}
        </Section>

        <Section title="Subregions">
          <div className="grid grid-cols-1 gap-6 sm:grid-cols-[17rem_1fr]">
            <SelectField label="Kind" name="subregionKind" value={values.subregionKind} onChange={(e) => set('subregionKind', e.target.value as StudyFormValues['subregionKind'])} error={errors.subregionKind}>
              {!(values.source === 'sprinkled' && !offersConcentric(values.regionKind)) && <option value="concentric">concentric, by ℓ/T</option>}
              {!(values.source === 'sprinkled' && !offersConcentric(values.regionKind)) && <option value="pairs">pairs for mutual information</option>}
              <option value="tips">by tips</option>
              {values.source === 'imported' && <option value="elements">element lists</option>}
            </SelectField>
            {values.subregionKind === 'elements' ? (
              <div className="flex flex-col gap-1">
                <label htmlFor="study-element-lists" className="text-xs tracking-wide text-ink-soft">
                  Element lists, one subregion per line: labels 0 … N−1, comma-separated
                </label>
                <textarea id="study-element-lists" name="elementLists" rows={3} value={values.elementLists} onChange={(e) => set('elementLists', e.target.value)} aria-invalid={Boolean(errors.elementLists)} placeholder="0, 1, 2, 3, 4, 5, 6, 7" className="border-0 border-b border-rule bg-transparent font-mono text-sm focus:border-accent focus:outline-none" />
                {errors.elementLists ? (
                  <p className="text-xs text-danger" role="alert">{errors.elementLists}</p>
                ) : (
                  <p className="text-xs text-ink-faint">a name may come first, as in "core: 0, 1, 2"; the only choice for relation lists; concentric sub-diamonds need sets imported with the same diamond region</p>
                )}
              </div>
            ) : values.subregionKind === 'pairs' ? (
              <div className="grid grid-cols-1 gap-6 sm:grid-cols-2">
                <TextField label="Pair sizes ℓ/T" name="pairSizes" className="font-mono" value={values.pairSizes} onChange={(e) => set('pairSizes', e.target.value)} error={errors.pairSizes} hint={`proper time of each of the two equal sub-diamonds; each needs ≥ ${STUDY_MIN_SUBREGION_ELEMENTS} elements at the smallest N`} />
                <TextField label="Separations d/T" name="separations" className="font-mono" value={values.separations} onChange={(e) => set('separations', e.target.value)} error={errors.separations} hint="gap between the facing corners on the central slice; 2ℓ + d ≤ L; three or more for a log-log fit of I against d" />
              </div>
            ) : values.subregionKind === 'concentric' ? (
              <TextField label="ℓ/T values" name="fractions" className="font-mono" value={values.fractions} onChange={(e) => set('fractions', e.target.value)} error={errors.fractions} hint={`sub-diamonds sharing the centre, proper time ℓ = (ℓ/T)·L; each needs ≥ ${STUDY_MIN_SUBREGION_ELEMENTS} elements at the smallest N`} />
            ) : (
              <div className="flex flex-col gap-1">
                <label htmlFor="study-tips" className="text-xs tracking-wide text-ink-soft">
                  {values.source === 'sprinkled' && regionDimension(values.regionKind) === 4
                    ? 'Sub-diamonds, one per line: past tip t,x,y,z then future tip t,x,y,z'
                    : 'Sub-diamonds, one per line: past tip t,x then future tip t,x'}
                </label>
                <textarea id="study-tips" name="tips" rows={3} value={values.tips} onChange={(e) => set('tips', e.target.value)} aria-invalid={Boolean(errors.tips)} className="border-0 border-b border-rule bg-transparent font-mono text-sm focus:border-accent focus:outline-none" />
                {errors.tips ? <p className="text-xs text-danger" role="alert">{errors.tips}</p> : <p className="text-xs text-ink-faint">a name may come first, as in "left: t,x t,x"; tables and exports then use it</p>}
              </div>
            )}
          </div>
        </Section>

        <Section title="Cut rules and field">
          <StudyRuleRows rules={values.rules} onChange={(update) => setValues((v) => ({ ...v, rules: update(v.rules) }))} dimension={dimension} presets={cutRules.data ?? []} errors={errors} />
          <div className="mt-6 grid grid-cols-1 gap-6 sm:grid-cols-[12rem_1fr]">
            <TextField label="Mass m" name="mass" inputMode="decimal" value={values.mass} onChange={(e) => set('mass', e.target.value)} error={errors.mass} disabled={values.source === 'sprinkled' && studyMasslessOnlyReason(values.regionKind) !== null} hint={values.source === 'sprinkled' && studyMasslessOnlyReason(values.regionKind) ? `Massless only here: ${studyMasslessOnlyReason(values.regionKind)}` : '0 for the massless field'} />
          </div>
          <div className="mt-6 max-w-md">
            <RenyiOrdersField value={values.renyi} onChange={(text) => set('renyi', text)} error={errors.renyi} />
          </div>
        </Section>

        <FormError message={formError} />
        <div className="mt-2">
          <Button type="submit" busy={create.isPending}>
            Start study
          </Button>
        </div>
      </form>
    </>
  );
}
