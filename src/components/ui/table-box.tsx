import type { ReactNode } from 'react';

/**
 * Holds a table that may be wider than a phone or tablet: the table scrolls sideways inside this box, never
 * the page. The box is a named region that takes keyboard focus, so its hidden columns can be reached with the
 * arrow keys (WCAG 2.1.1). It is positioned, so visually hidden (absolute) text in the table is clipped with it.
 */
export function TableBox({ label, children, className = '' }: { label: string; children: ReactNode; className?: string }) {
  return (
    // eslint-disable-next-line jsx-a11y/no-noninteractive-tabindex -- a scrolling region must be reachable by keyboard
    <div role="region" aria-label={label} tabIndex={0} className={`relative max-w-full overflow-x-auto ${className}`}>
      {children}
    </div>
  );
}
