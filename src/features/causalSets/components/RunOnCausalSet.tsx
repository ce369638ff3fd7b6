import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import type { CausalSetSummary } from '@shared/causalSets';
import { createRunRequestSchema } from '@shared/runs';
import { defaultTruncationFor, parseSubregion } from '@shared/vacuum';
import { isApiError } from '../../../lib/apiClient';
import { parseNumber, validate, type FieldErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, SelectField, TextField } from '../../../ui/Field';
import { truncationFieldMessages, truncationFromForm, truncationKinds, truncationToForm, type TruncationFormValues } from '../../../lib/truncationForm';
import { useCreateRun } from '../../runs/api/runs';
import { Checkbox } from '../../../ui/Checkbox';
import { RestrictedCutFields } from '../../../ui/RestrictedCutFields';
import { defaultRestrictedCutForm, restrictedCutFromForm, type RestrictedCutFormValues } from '../../../lib/truncationForm';

/** A vacuum run on this causal set in place of a sprinkling: truncation, mass and an optional subregion. */
export function RunOnCausalSet({ set }: { set: CausalSetSummary }) {
  const navigate = useNavigate();
  const createRun = useCreateRun();
  // √N/(4π) is a 2D rule: a 4D set starts from the knee
  const [truncation, setTruncation] = useState<TruncationFormValues>(() => truncationToForm(defaultTruncationFor(set.dimension)));
  const [mass, setMass] = useState('0');
  const [subregion, setSubregion] = useState('');
  const [doubleTruncation, setDoubleTruncation] = useState(false);
  const [restrictedCut, setRestrictedCut] = useState<RestrictedCutFormValues>({ ...defaultRestrictedCutForm });
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const kind = truncationKinds.find((k) => k.kind === truncation.kind)!;
  const exampleSubregion = set.kind === 'relations' ? 'elements:0,1,2,5' : set.dimension === 2 ? 'diamond:-0.5,0:0.5,0' : 'diamond:-0.5,0,0,0:0.5,0,0,0';

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    const found: FieldErrors = {};
    let parsedSubregion: unknown;
    if (subregion.trim()) {
      try {
        parsedSubregion = parseSubregion(subregion);
      } catch (error) {
        found.subregion = (error as Error).message;
      }
    }
    const body = {
      causalSetId: set.id,
      title: `${set.name}`,
      mass: parseNumber(mass) ?? 0,
      truncation: truncationFromForm(truncation),
      ...(parsedSubregion ? { subregion: parsedSubregion, doubleTruncation, restrictedCut: restrictedCutFromForm(doubleTruncation, restrictedCut) } : {}),
    };
    const checked = validate(createRunRequestSchema, body);
    if (!checked.ok) for (const [path, message] of Object.entries(checked.errors)) found[path] ??= truncationFieldMessages[path] ?? message;
    setErrors(found);
    if (!checked.ok || Object.keys(found).length) return;
    try {
      const { id } = await createRun.mutateAsync(checked.data);
      navigate(`/runs/${id}`);
    } catch (error) {
      setFormError(isApiError(error) ? error.message : 'The run could not be started.');
    }
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-5" aria-label="Run on this causal set">
      <div className="grid grid-cols-1 gap-5 sm:grid-cols-3">
        <SelectField label="Truncation" name="truncation" value={truncation.kind} onChange={(e) => setTruncation({ kind: e.target.value as TruncationFormValues['kind'], value: '' })} hint={kind.hint}>
          {truncationKinds.map((k) => (
            <option key={k.kind} value={k.kind}>
              {k.label}
            </option>
          ))}
        </SelectField>
        {kind.valueLabel ? (
          <TextField label={kind.valueLabel} name="truncationValue" inputMode="decimal" className="figures" value={truncation.value} onChange={(e) => setTruncation({ ...truncation, value: e.target.value })} error={errors['truncation.cut'] ?? errors['truncation.count'] ?? errors['truncation.tolerance']} />
        ) : (
          <span />
        )}
        <TextField label="Mass m" name="mass" inputMode="decimal" className="figures" value={mass} onChange={(e) => setMass(e.target.value)} error={errors.mass} hint={set.density === null ? 'needs a density; this set has none' : 'units c = 1'} />
      </div>
      <TextField label="Subregion for the entropy (optional)" name="subregion" className="figures" value={subregion} onChange={(e) => setSubregion(e.target.value)} error={errors.subregion} placeholder={exampleSubregion} hint={set.kind === 'relations' ? 'elements:I,J,… (element labels)' : 'diamond:T0,X0:T1,X1 between two tips, or elements:I,J,…'} />
      {subregion.trim() && <Checkbox label="Double truncation" hint="Cut the restricted state again before the entropy (Sorkin–Yazdi), at the restricted cut below." checked={doubleTruncation} onChange={setDoubleTruncation} />}
      {subregion.trim() && doubleTruncation && <RestrictedCutFields value={restrictedCut} onChange={setRestrictedCut} error={errors['restrictedCut.cut']} />}
      <FormError message={formError} />
      <div>
        <Button type="submit" busy={createRun.isPending}>
          Start the run
        </Button>
      </div>
    </form>
  );
}
