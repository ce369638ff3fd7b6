import type { ReactNode } from 'react';
import { Link } from 'react-router';

/** The narrow, centred column for pages seen before signing in. */
export function AuthLayout({ title, lead, children, footer }: { title: string; lead?: ReactNode; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="min-h-screen bg-paper px-6">
      <div className="mx-auto flex max-w-sm flex-col pt-[12vh] pb-16">
        <Link to="/" className="mb-12 self-start text-lg font-semibold tracking-[0.2em] text-ink uppercase">
          Tacet
        </Link>
        <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
        {lead && <div className="mt-2 text-sm text-ink-soft">{lead}</div>}
        <div className="mt-8 border-t border-rule pt-8">{children}</div>
        {footer && <div className="mt-10 border-t border-rule pt-4 text-sm text-ink-soft">{footer}</div>}
      </div>
    </div>
  );
}
