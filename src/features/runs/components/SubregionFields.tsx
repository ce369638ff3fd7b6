import { TextField } from '../../../ui/Field';
import { RestrictedCutFields } from '../../../ui/RestrictedCutFields';
import type { RestrictedCutFormValues } from '../../../lib/truncationForm';
import type { TipValues } from '../lib/runForm';
import { Checkbox } from '../../../ui/Checkbox';

interface SubregionFieldsProps {
  dimension: 2 | 4;
  enabled: boolean;
  onEnabledChange(enabled: boolean): void;
  past: TipValues;
  future: TipValues;
  onTipChange(which: 'past' | 'future', values: TipValues): void;
  doubleTruncation: boolean;
  onDoubleTruncationChange(value: boolean): void;
  restrictedCut: RestrictedCutFormValues;
  onRestrictedCutChange(value: RestrictedCutFormValues): void;
  errors: Record<string, string | undefined>;
  /** when given, the subregion is a list of element labels (an imported causal set) instead of tips */
  elements?: { value: string; onChange(text: string): void; count: number | null; error?: string };
}

/**
 * The optional subregion: a diamond given by its past and future tips, or on an imported causal set a
 * list of element labels; and the double-truncation switch.
 */
export function SubregionFields(props: SubregionFieldsProps) {
  const { dimension, enabled, past, future, errors } = props;
  const coordinates = dimension === 4 ? (['t', 'x', 'y', 'z'] as const) : (['t', 'x'] as const);

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
          {props.elements && (
            <TextField
              label="Elements"
              name="elementList"
              className="font-mono"
              value={props.elements.value}
              onChange={(e) => props.elements!.onChange(e.target.value)}
              error={props.elements.error}
              placeholder="0, 1, 2, 3"
              hint={
                props.elements.count !== null
                  ? `Comma-separated labels from 0 to ${props.elements.count - 1}, as in the imported file.`
                  : 'Comma-separated element labels, counting from 0.'
              }
            />
          )}
          {!props.elements && (['past', 'future'] as const).map((which) => {
            const tip = which === 'past' ? past : future;
            return (
              <fieldset key={which} className="grid grid-cols-2 gap-6 sm:grid-cols-4">
                <legend className="mb-2 text-xs tracking-wide text-ink-soft">{which === 'past' ? 'Past tip' : 'Future tip'}</legend>
                {coordinates.map((c) => (
                  <TextField
                    key={c}
                    label={`${which} ${c}`}
                    name={`${which}-${c}`}
                    inputMode="decimal"
                    className="font-mono"
                    value={tip[c]}
                    onChange={(e) => props.onTipChange(which, { ...tip, [c]: e.target.value })}
                    error={errors[`subregion.${which}.${c}`]}
                  />
                ))}
              </fieldset>
            );
          })}
          {errors.subregion && (
            <p role="alert" className="text-xs text-danger">
              {errors.subregion}
            </p>
          )}
          <Checkbox
            name="doubleTruncation"
            label="Double truncation"
            hint="Cut the restricted state again before the entropy (Sorkin–Yazdi), at the restricted cut below."
            checked={props.doubleTruncation}
            onChange={props.onDoubleTruncationChange}
          />
          {props.doubleTruncation && <RestrictedCutFields value={props.restrictedCut} onChange={props.onRestrictedCutChange} error={errors['restrictedCut.cut']} />}
        </>
      )}
    </div>
  );
}
