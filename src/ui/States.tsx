import type { ReactNode } from 'react';
import { Button } from './Button';

export function Loading({ label = 'Loading' }: { label?: string }) {
  return (
    <p className="py-6 text-sm text-ink-faint" role="status" aria-live="polite">
      <span className="figures mr-2 inline-block animate-pulse">···</span>
      {label}
    </p>
  );
}

export function Empty({ children }: { children: ReactNode }) {
  return <p className="py-6 text-sm text-ink-soft">{children}</p>;
}

export function ErrorState({ error, onRetry }: { error: unknown; onRetry?: () => void }) {
  const message = error instanceof Error ? error.message : 'Something went wrong.';
  return (
    <div role="alert" className="my-4 flex items-baseline gap-4 border-l-2 border-danger py-1 pl-3 text-sm">
      <span className="text-danger">{message}</span>
      {onRetry && (
        <Button variant="quiet" onClick={onRetry}>
          Try again
        </Button>
      )}
    </div>
  );
}
