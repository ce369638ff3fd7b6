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
import { RenyiOrdersField, renyiOrdersFromText } from '../../../ui/RenyiOrdersField';

/** The field a server issue belongs beside: a side of the pair, the pair, or the path itself. */
function fieldOfIssue(path: string): string {
  const side = /^mutualInformation\.([ab])/.exec(path);
  if (side) return `mutualInformation.${side[1]}`;
  if (path.startsWith('subregion')) return 'subregion';
  if (path.startsWith('renyi')) return 'renyi';
  return path;
}

/** A vacuum run on this causal set in place of a sprinkling: truncation, mass and an optional subregion. */
export function RunOnCausalSet({ set }: { set: CausalSetSummary }) {
  const navigate = useNavigate();
  const createRun = useCreateRun();
  // √N/(4π) is a 2D rule: a 4D set starts from the knee
  const [truncation, setTruncation] = useState<TruncationFormValues>(() => truncationToForm(defaultTruncationFor(set.dimension)));
  const [mass, setMass] = useState('0');
  const [subregion, setSubregion] = useState('');
  // on by default (Sorkin–Yazdi 2018): without the second cut a subregion's entropy on a causal set follows its volume, not its boundary
  const [doubleTruncation, setDoubleTruncation] = useState(true);
  const [restrictedCut, setRestrictedCut] = useState<RestrictedCutFormValues>({ ...defaultRestrictedCutForm });
  const [renyi, setRenyi] = useState('');
  const [complement, setComplement] = useState(false);
  const [withPair, setWithPair] = useState(false);
  const [pairText, setPairText] = useState({ a: '', b: '' });
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
    const orders = parsedSubregion ? renyiOrdersFromText(renyi) : { orders: undefined };
    if (orders.error) found.renyi = orders.error;
    const pair: Record<string, unknown> = {};
    if (withPair) {
      for (const side of ['a', 'b'] as const) {
        try {
          pair[side] = parseSubregion(pairText[side]);
        } catch (error) {
          found[`mutualInformation.${side}`] = (error as Error).message;
        }
      }
    }
    const cut = parsedSubregion !== undefined || withPair;
    const body = {
      causalSetId: set.id,
      title: `${set.name}`,
      mass: parseNumber(mass) ?? 0,
      truncation: truncationFromForm(truncation),
      ...(parsedSubregion ? { subregion: parsedSubregion, ...(orders.orders ? { renyi: orders.orders } : {}), ...(complement ? { complement: true } : {}) } : {}),
      ...(withPair ? { mutualInformation: pair } : {}),
      ...(cut ? { doubleTruncation, restrictedCut: restrictedCutFromForm(doubleTruncation, restrictedCut) } : {}),
    };
    const checked = validate(createRunRequestSchema, body);
    if (!checked.ok) for (const [path, message] of Object.entries(checked.errors)) found[fieldOfIssue(path)] ??= truncationFieldMessages[path] ?? message;
    setErrors(found);
    if (!checked.ok || Object.keys(found).length) return;
    try {
      const { id } = await createRun.mutateAsync(checked.data);
      navigate(`/runs/${id}`);
    } catch (error) {
      if (!isApiError(error)) return setFormError('The run could not be started.');
      const beside: FieldErrors = {};
      for (const issue of error.issues) beside[fieldOfIssue(issue.path)] ??= issue.message;
      setErrors(beside);
      setFormError(Object.values(beside).includes(error.message) ? 'The server refused these settings; see the message beside the field.' : error.message);
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
      {subregion.trim() && (
        <>
          <RenyiOrdersField value={renyi} onChange={setRenyi} error={errors.renyi} />
          <Checkbox
            name="complement"
            label="Complement check"
            hint="Also the entropy of the subregion’s causal complement in the set, beside S with the difference: a purity diagnostic of the whole state."
            checked={complement}
            onChange={setComplement}
          />
          {errors.complement && <p role="alert" className="text-xs text-danger">{errors.complement}</p>}
        </>
      )}
      <Checkbox
        name="withPair"
        label="Compute the mutual information of two subregions"
        hint="I(A:B) = S_A + S_B − S_A∪B on the same state, for two disjoint, spacelike-separated subregions."
        checked={withPair}
        onChange={setWithPair}
      />
      {withPair && (
        <>
          <div className="grid grid-cols-1 gap-5 sm:grid-cols-2">
            {(['a', 'b'] as const).map((side) => (
              <TextField
                key={side}
                label={`Subregion ${side.toUpperCase()}`}
                name={`pair-${side}`}
                className="figures"
                value={pairText[side]}
                onChange={(e) => setPairText({ ...pairText, [side]: e.target.value })}
                error={errors[`mutualInformation.${side}`]}
                placeholder={set.kind === 'relations' ? (side === 'a' ? 'elements:0,1' : 'elements:4,5') : exampleSubregion}
                hint={set.kind === 'relations' ? 'elements:I,J,… — a relation list has no coordinates for tips' : 'diamond:T0,X0:T1,X1 or elements:I,J,…'}
              />
            ))}
          </div>
          {errors.mutualInformation && <p role="alert" className="text-xs text-danger">{errors.mutualInformation}</p>}
          <p className="text-xs text-ink-faint">Under double truncation each of A, B and A∪B gets its own restricted cut: √n/(4π) with its own element count n.</p>
        </>
      )}
      {(subregion.trim() || withPair) && <Checkbox label="Double truncation" hint="Cut the restricted state again before the entropy (Sorkin–Yazdi), at the restricted cut below." checked={doubleTruncation} onChange={setDoubleTruncation} />}
      {(subregion.trim() || withPair) && doubleTruncation && <RestrictedCutFields value={restrictedCut} onChange={setRestrictedCut} error={errors['restrictedCut.cut']} />}
      <FormError message={formError} />
      <div>
        <Button type="submit" busy={createRun.isPending}>
          Start the run
        </Button>
      </div>
    </form>
  );
}
