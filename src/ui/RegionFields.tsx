import {
  regionDescriptors,
  regionFormFields,
  regionKinds,
  type RegionFieldKey,
  type RegionFieldValues,
  type RegionFieldWording,
  type RegionKind,
} from '@shared/regions';
import { SelectField, TextField } from './Field';

interface RegionFieldsProps {
  values: RegionFieldValues;
  onKindChange(kind: RegionKind): void;
  onFieldChange(key: RegionFieldKey, text: string): void;
  /** the message beside the kind (the region as a whole) */
  kindError?: string;
  /** the message beside a field */
  fieldError?(key: RegionFieldKey): string | undefined;
  /** the form's own words for some fields (the run form's are the registry's) */
  wording?: RegionFieldWording;
  /** what the menu shows per kind: its label, or the longer description that says where it lies */
  optionText?: 'label' | 'description';
  /** classes of the number inputs */
  inputClassName?: string;
  /** classes of a box around the menu (to span grid columns), none by default */
  selectClassName?: string;
}

/**
 * The region part of the run, study and import forms: the menu of region kinds from the registry and
 * the fields of the kind picked (shared/regions.ts `regionFormFields`), as siblings for the caller's grid.
 */
export function RegionFields({
  values,
  onKindChange,
  onFieldChange,
  kindError,
  fieldError,
  wording,
  optionText = 'label',
  inputClassName = 'font-mono',
  selectClassName,
}: RegionFieldsProps) {
  const select = (
    <SelectField label="Region" name="regionKind" value={values.regionKind} onChange={(e) => onKindChange(e.target.value as RegionKind)} error={kindError}>
      {regionKinds.map((kind) => (
        <option key={kind} value={kind}>
          {regionDescriptors[kind][optionText]}
        </option>
      ))}
    </SelectField>
  );
  return (
    <>
      {selectClassName ? <div className={selectClassName}>{select}</div> : select}
      {regionFormFields(values.regionKind, wording).map((field) => (
        <TextField
          key={field.key}
          label={field.label}
          name={field.key}
          inputMode="decimal"
          className={inputClassName}
          value={values[field.key]}
          onChange={(e) => onFieldChange(field.key, e.target.value)}
          error={fieldError?.(field.key)}
          hint={field.hint}
        />
      ))}
    </>
  );
}
