import type { ReactNode } from 'react';

export function Checkbox({
  label,
  checked,
  onChange,
  hint,
  name,
  disabled = false,
}: {
  disabled?: boolean;
  label: ReactNode;
  checked: boolean;
  onChange(checked: boolean): void;
  hint?: ReactNode;
  name?: string;
}) {
  return (
    <label className={`flex items-start gap-2.5 text-sm ${disabled ? 'cursor-not-allowed opacity-40' : 'cursor-pointer'}`}>
      <input
        type="checkbox"
        name={name}
        className="mt-0.5 size-4 cursor-[inherit] accent-accent"
        checked={checked}
        disabled={disabled}
        onChange={(e) => onChange(e.target.checked)}
      />
      <span>
        <span className="text-ink">{label}</span>
        {hint && <span className="block text-xs text-ink-faint">{hint}</span>}
      </span>
    </label>
  );
}
