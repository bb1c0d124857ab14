import { useEffect, useRef, type ReactNode } from 'react';
import { usePageTitle } from '@/hooks/use-page-title';

/** The page's heading; it also names the browser tab ("<docTitle or title> · Cristae"). */
export function PageHeader({ title, lead, actions, docTitle }: { title: string; lead?: ReactNode; actions?: ReactNode; docTitle?: string }) {
  usePageTitle(docTitle ?? title);
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-paper-line pb-4">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight text-matrix-900">{title}</h1>
        {lead ? <p className="mt-1 max-w-3xl text-sm text-ink-soft">{lead}</p> : null}
      </div>
      {actions ? <div className="flex gap-2">{actions}</div> : null}
    </header>
  );
}

export function Card({ title, children, className = '', actions }: { title?: string; children: ReactNode; className?: string; actions?: ReactNode }) {
  return (
    <section className={`min-w-0 rounded-card border border-paper-line bg-paper-raised p-5 shadow-card ${className}`}>
      {title || actions ? (
        <div className="mb-3 flex flex-wrap items-center justify-between gap-3">
          {title ? <h2 className="text-lg font-semibold text-matrix-900">{title}</h2> : <span />}
          {actions}
        </div>
      ) : null}
      {children}
    </section>
  );
}

/**
 * A message in a box. `focus`: the message takes keyboard focus when it appears or changes (after a save or an
 * error), so a keyboard or screen-reader user lands on what happened instead of staying on the button.
 */
export function Notice({ tone = 'info', children, focus = false }: { tone?: 'info' | 'error' | 'success'; children: ReactNode; focus?: boolean }) {
  const tones = {
    info: 'border-matrix-200 bg-matrix-50 text-matrix-900',
    error: 'border-below/40 bg-below-bg text-below',
    success: 'border-within/40 bg-within-bg text-within',
  };
  const box = useRef<HTMLDivElement>(null);
  const text = typeof children === 'string' ? children : null;
  useEffect(() => {
    if (focus) box.current?.focus();
  }, [focus, text]);
  return (
    <div
      ref={box}
      tabIndex={focus ? -1 : undefined}
      role={tone === 'error' ? 'alert' : 'status'}
      className={`rounded-md border px-3 py-2 text-sm ${tones[tone]}`}
    >
      {children}
    </div>
  );
}

/** The caution every result screen and report carries. */
export function ResultsCaution() {
  return (
    <aside aria-label="Caution" className="rounded-md border border-caution-line bg-caution-bg px-4 py-3 text-sm text-caution">
      <strong className="font-semibold">Caution. </strong>
      These are laboratory measurements. They support, and never replace, a diagnosis by a licensed clinician;
      their meaning depends on the specimen, how it was handled and the clinical picture. Local regulations and
      the laboratory&apos;s accreditation rules govern reporting.
    </aside>
  );
}

export function Loading({ what = 'Loading' }: { what?: string }) {
  return (
    <p className="py-6 text-sm text-ink-faint" role="status">
      {what}…
    </p>
  );
}
