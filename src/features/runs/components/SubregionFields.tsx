import type { ReactNode } from 'react';
import { TextField } from '../../../ui/Field';
import { RenyiOrdersField } from '../../../ui/RenyiOrdersField';
import { RestrictedCutFields } from '../../../ui/RestrictedCutFields';
import type { RestrictedCutFormValues } from '../../../lib/truncationForm';
import type { SubregionShapeValues, TipValues } from '../lib/runForm';
import { Checkbox } from '../../../ui/Checkbox';

type Errors = Record<string, string | undefined>;

/** Element labels in place of tips (an imported causal set). */
interface ElementListInput {
  value: string;
  onChange(text: string): void;
  count: number | null;
  error?: string;
}

interface SubregionShapeProps {
  dimension: 2 | 4;
  past: TipValues;
  future: TipValues;
  onTipChange(which: 'past' | 'future', values: TipValues): void;
  errors: Errors;
  /** where this shape's messages sit in the request: "subregion", "mutualInformation.a" */
  path: string;
  /** what is prefixed to the fields' names and labels ("" for the subregion, "A " for A) */
  labelPrefix?: string;
  elements?: ElementListInput;
}

/** One subregion's shape: a diamond by its past and future tips, or a list of element labels. */
export function SubregionShapeFields({ dimension, past, future, onTipChange, errors, path, labelPrefix = '', elements }: SubregionShapeProps) {
  const coordinates = dimension === 4 ? (['t', 'x', 'y', 'z'] as const) : (['t', 'x'] as const);
  const namePrefix = labelPrefix.trim() ? `${labelPrefix.trim().toLowerCase()}-` : '';
  if (elements) {
    return (
      <TextField
        label={`${labelPrefix}Elements`}
        name={`${namePrefix}elementList`}
        className="font-mono"
        value={elements.value}
        onChange={(e) => elements.onChange(e.target.value)}
        error={elements.error}
        placeholder="0, 1, 2, 3"
        hint={elements.count !== null ? `Comma-separated labels from 0 to ${elements.count - 1}, as in the imported file.` : 'Comma-separated element labels, counting from 0.'}
      />
    );
  }
  return (
    <>
      {(['past', 'future'] as const).map((which) => {
        const tip = which === 'past' ? past : future;
        return (
          <fieldset key={which} className="grid grid-cols-2 gap-6 sm:grid-cols-4">
            <legend className="mb-2 text-xs tracking-wide text-ink-soft">
              {labelPrefix}
              {which === 'past' ? (labelPrefix ? 'past tip' : 'Past tip') : labelPrefix ? 'future tip' : 'Future tip'}
            </legend>
            {coordinates.map((c) => (
              <TextField
                key={c}
                label={`${labelPrefix}${which} ${c}`}
                name={`${namePrefix}${which}-${c}`}
                inputMode="decimal"
                className="font-mono"
                value={tip[c]}
                onChange={(e) => onTipChange(which, { ...tip, [c]: e.target.value })}
                error={errors[`${path}.${which}.${c}`]}
              />
            ))}
          </fieldset>
        );
      })}
    </>
  );
}

function FieldAlert({ message }: { message?: string }) {
  if (!message) return null;
  return (
    <p role="alert" className="text-xs text-danger">
      {message}
    </p>
  );
}

interface SubregionFieldsProps {
  dimension: 2 | 4;
  enabled: boolean;
  onEnabledChange(enabled: boolean): void;
  past: TipValues;
  future: TipValues;
  onTipChange(which: 'past' | 'future', values: TipValues): void;
  errors: Errors;
  /** when given, the subregion is a list of element labels (an imported causal set) instead of tips */
  elements?: ElementListInput;
  /** the Rényi orders of the subregion's entropy */
  renyi?: { value: string; onChange(text: string): void };
  /** the complement check */
  complement?: { checked: boolean; onChange(value: boolean): void };
  /** on a region with cosmological horizons: fills the tips with the part inside the observer's horizons */
  onHorizonPart?(): void;
}

/**
 * The optional subregion: a diamond given by its past and future tips, or on an imported causal set a
 * list of element labels; its Rényi orders and the complement check.
 */
export function SubregionFields(props: SubregionFieldsProps) {
  const { enabled, errors } = props;
  return (
    <div className="flex flex-col gap-5">
      <Checkbox
        name="withSubregion"
        label="Compute the entanglement entropy of a subregion"
        hint={
          props.elements
            ? 'A set of elements of the causal set, by their labels.'
            : 'A causal diamond between two events inside the region; its elements are found from the causal order.'
        }
        checked={enabled}
        onChange={props.onEnabledChange}
      />
      {enabled && (
        <>
          <SubregionShapeFields dimension={props.dimension} past={props.past} future={props.future} onTipChange={props.onTipChange} errors={errors} path="subregion" elements={props.elements} />
          {props.onHorizonPart && !props.elements && (
            <div className="flex flex-wrap items-baseline gap-3 text-sm">
              <button type="button" className="text-accent underline underline-offset-2" onClick={props.onHorizonPart}>
                Horizon-bounded part
              </button>
              <span className="text-ink-faint">tips at (T, θ) = (∓π/2, 0): the part inside the horizons of the observer at θ = 0</span>
            </div>
          )}
          <FieldAlert message={errors.subregion} />
          {props.renyi && <RenyiOrdersField value={props.renyi.value} onChange={props.renyi.onChange} error={errors.renyi} />}
          {props.complement && (
            <>
              <Checkbox
                name="complement"
                label="Complement check"
                hint="Also the entropy of the subregion’s causal complement in the region (the elements unrelated to all of it), beside S with the difference: a purity diagnostic of the whole-region state."
                checked={props.complement.checked}
                onChange={props.complement.onChange}
              />
              <FieldAlert message={errors.complement} />
            </>
          )}
        </>
      )}
    </div>
  );
}

interface PairFieldsProps {
  dimension: 2 | 4;
  enabled: boolean;
  onEnabledChange(enabled: boolean): void;
  a: SubregionShapeValues;
  b: SubregionShapeValues;
  onChange(side: 'a' | 'b', values: SubregionShapeValues): void;
  errors: Errors;
  /** element lists instead of tips (an imported causal set; a relation list needs them) */
  byElements?: { count: number | null };
}

/** The optional pair A, B for the mutual information I(A:B), each the same widget as the subregion. */
export function PairFields({ dimension, enabled, onEnabledChange, a, b, onChange, errors, byElements }: PairFieldsProps) {
  const side = (key: 'a' | 'b', values: SubregionShapeValues): ReactNode => (
    <div key={key} className="flex flex-col gap-4 border-l border-rule pl-4" data-testid={`pair-${key}`}>
      <h3 className="text-xs font-semibold uppercase tracking-[0.12em] text-ink-soft">Subregion {key.toUpperCase()}</h3>
      <SubregionShapeFields
        dimension={dimension}
        past={values.past}
        future={values.future}
        onTipChange={(which, tip) => onChange(key, { ...values, [which]: tip })}
        errors={errors}
        path={`mutualInformation.${key}`}
        labelPrefix={`${key.toUpperCase()} `}
        elements={byElements ? { value: values.elementList, onChange: (text) => onChange(key, { ...values, elementList: text }), count: byElements.count, error: errors[`mutualInformation.${key}.indices`] } : undefined}
      />
      <FieldAlert message={errors[`mutualInformation.${key}`]} />
    </div>
  );
  return (
    <div className="flex flex-col gap-5">
      <Checkbox
        name="withPair"
        label="Compute the mutual information of two subregions"
        hint="I(A:B) = S_A + S_B − S_A∪B on the same state, for two disjoint, spacelike-separated subregions A and B."
        checked={enabled}
        onChange={onEnabledChange}
      />
      {enabled && (
        <>
          {side('a', a)}
          {side('b', b)}
          <FieldAlert message={errors.mutualInformation} />
          <p className="text-xs text-ink-faint">
            Under double truncation each of A, B and A∪B gets its own restricted cut: √n/(4π) with its own element count n (a fixed
            restricted λ applies to all three alike).
          </p>
        </>
      )}
    </div>
  );
}

/** Double truncation and its restricted cut, for the subregion and the pair alike. */
export function DoubleTruncationFields({
  doubleTruncation,
  onDoubleTruncationChange,
  restrictedCut,
  onRestrictedCutChange,
  errors,
}: {
  doubleTruncation: boolean;
  onDoubleTruncationChange(value: boolean): void;
  restrictedCut: RestrictedCutFormValues;
  onRestrictedCutChange(value: RestrictedCutFormValues): void;
  errors: Errors;
}) {
  return (
    <>
      <Checkbox
        name="doubleTruncation"
        label="Double truncation"
        hint="Cut the restricted state again before the entropy (Sorkin–Yazdi), at the restricted cut below."
        checked={doubleTruncation}
        onChange={onDoubleTruncationChange}
      />
      <FieldAlert message={errors.doubleTruncation} />
      {doubleTruncation && <RestrictedCutFields value={restrictedCut} onChange={onRestrictedCutChange} error={errors['restrictedCut.cut']} />}
    </>
  );
}
