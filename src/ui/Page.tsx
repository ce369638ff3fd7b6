import type { ReactNode } from 'react';

/** A page title with an optional line of context and actions on the right, set off by a thin rule. */
export function PageHeader({ title, context, actions }: { title: ReactNode; context?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-8 flex flex-wrap items-end justify-between gap-4 border-b border-rule pb-4">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight text-ink">{title}</h1>
        {context && <p className="mt-1 text-sm text-ink-soft">{context}</p>}
      </div>
      {actions && <div className="flex items-center gap-3">{actions}</div>}
    </header>
  );
}

export function Section({ title, aside, children }: { title: string; aside?: ReactNode; children: ReactNode }) {
  return (
    <section className="mb-12">
      <div className="mb-3 flex items-baseline justify-between gap-4">
        <h2 className="text-sm font-semibold uppercase tracking-[0.12em] text-ink-soft">{title}</h2>
        {aside && <div className="text-sm text-ink-faint">{aside}</div>}
      </div>
      {children}
    </section>
  );
}
