import type { CutRule } from '@shared/runs';
import { SelectField, TextField } from './Field';
import { describeTruncation, truncationKinds, truncationToForm, type TruncationFormValues } from '../lib/truncationForm';

interface TruncationRuleFieldsProps {
  value: TruncationFormValues;
  onChange(value: TruncationFormValues): void;
  /** field errors keyed by request path (truncation.cut, truncation.count, ...) */
  errors: Record<string, string | undefined>;
  /** the team's saved cut rules; picking one copies its rule into the fields */
  presets?: CutRule[];
  /** id of the preset the fields were copied from, while they are unchanged */
  presetId?: string | null;
  onPresetChange?(presetId: string | null): void;
}

/** Truncation rule: a saved cut rule or a rule set here, with the one number the rule needs. */
export function TruncationRuleFields({ value, onChange, errors, presets, presetId, onPresetChange }: TruncationRuleFieldsProps) {
  const kind = truncationKinds.find((k) => k.kind === value.kind) ?? truncationKinds[0];
  const valueError = errors['truncation.cut'] ?? errors['truncation.count'] ?? errors['truncation.tolerance'];
  const showPresets = presets !== undefined && onPresetChange !== undefined;

  return (
    <div className={`grid grid-cols-1 gap-6 ${showPresets ? 'sm:grid-cols-3' : 'sm:grid-cols-2'}`}>
      {showPresets && (
        <SelectField
          label="Saved cut rule"
          name="cutRule"
          value={presetId ?? ''}
          onChange={(e) => {
            const preset = presets.find((p) => p.id === e.target.value);
            onPresetChange(preset ? preset.id : null);
            if (preset) onChange(truncationToForm(preset.rule));
          }}
          hint={presets.length === 0 ? 'None saved yet (Cut rules page).' : 'Copies the rule into the fields.'}
        >
          <option value="">Type a rule below, or pick a saved one</option>
          {presets.map((preset) => (
            <option key={preset.id} value={preset.id}>
              {preset.name} — {describeTruncation(preset.rule)}
            </option>
          ))}
        </SelectField>
      )}
      <SelectField
        label="Truncation rule"
        name="truncationKind"
        value={value.kind}
        onChange={(e) => {
          onPresetChange?.(null);
          onChange({ kind: e.target.value as TruncationFormValues['kind'], value: '' });
        }}
        error={errors.truncation}
        hint={kind.valueLabel ? undefined : kind.hint}
      >
        {truncationKinds.map((k) => (
          <option key={k.kind} value={k.kind}>
            {k.label}
          </option>
        ))}
      </SelectField>
      {kind.valueLabel && (
        <TextField
          label={kind.valueLabel}
          name="truncationValue"
          inputMode="decimal"
          className="font-mono"
          value={value.value}
          onChange={(e) => {
            onPresetChange?.(null);
            onChange({ ...value, value: e.target.value });
          }}
          error={valueError}
          hint={kind.hint}
        />
      )}
    </div>
  );
}
