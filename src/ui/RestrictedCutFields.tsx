import type { RestrictedCutFormValues } from '../lib/truncationForm';
import { SelectField, TextField } from './Field';

/** The second cut of double truncation: √n/(4π) of the subregion's n elements, or a fixed λ. */
export function RestrictedCutFields({ value, onChange, error }: { value: RestrictedCutFormValues; onChange(value: RestrictedCutFormValues): void; error?: string }) {
  return (
    <div className="grid grid-cols-1 gap-6 sm:grid-cols-2">
      <SelectField
        label="Restricted cut"
        name="restrictedCutKind"
        value={value.kind}
        onChange={(e) => onChange({ ...value, kind: e.target.value as RestrictedCutFormValues['kind'] })}
        hint={
          value.kind === 'sqrtN'
            ? 'Drop the restricted modes with |λ| ≤ √n/(4π), n the elements of the subregion (the published 2D rule).'
            : 'Drop the restricted modes with |λ| at or below a fixed λ.'
        }
      >
        <option value="sqrtN">√n / 4π</option>
        <option value="lambda">Fixed λ</option>
      </SelectField>
      {value.kind === 'lambda' && (
        <TextField
          label="Restricted λ"
          name="restrictedCutValue"
          inputMode="decimal"
          className="font-mono"
          value={value.value}
          onChange={(e) => onChange({ ...value, value: e.target.value })}
          error={error}
        />
      )}
    </div>
  );
}
