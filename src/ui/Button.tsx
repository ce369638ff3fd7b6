import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'quiet' | 'danger';

const variantClasses: Record<Variant, string> = {
  primary:
    'bg-accent text-paper hover:bg-accent-deep disabled:bg-ink-faint px-4 py-1.5 rounded-sm font-medium',
  quiet: 'text-accent hover:text-accent-deep hover:underline underline-offset-4 disabled:text-ink-faint px-1 py-1',
  danger: 'text-danger hover:underline underline-offset-4 disabled:text-ink-faint px-1 py-1',
};

interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  busy?: boolean;
}

export function Button({ variant = 'primary', busy = false, className = '', children, disabled, ...rest }: ButtonProps) {
  return (
    <button
      type="button"
      {...rest}
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={`inline-flex items-center gap-2 text-sm transition-colors disabled:cursor-not-allowed ${variantClasses[variant]} ${className}`}
    >
      {children}
      {busy && <span className="figures text-xs opacity-80" aria-hidden>…</span>}
    </button>
  );
}
