import type { EngineRequest } from '@shared/engineChoice';
import { SelectField } from '../../../ui/Field';

/** The engine select of the run forms, with the note on which engine the rule picks beside it. */
export function EngineFields({
  name,
  value,
  onChange,
  error,
  note,
}: {
  name: string;
  value: EngineRequest;
  onChange: (engine: EngineRequest) => void;
  error?: string;
  note: string;
}) {
  return (
    <div className="grid grid-cols-1 gap-6 sm:grid-cols-3">
      <SelectField label="Engine" name={name} value={value} onChange={(e) => onChange(e.target.value as EngineRequest)} error={error}>
        <option value="auto">Auto (by the rule)</option>
        <option value="dense">Dense (whole spectrum)</option>
        <option value="structured">Structured (modes above the cut)</option>
      </SelectField>
      <p className="text-sm text-ink-soft sm:col-span-2 sm:pt-7" aria-live="polite" data-testid={`${name}-note`}>
        {note}
      </p>
    </div>
  );
}
