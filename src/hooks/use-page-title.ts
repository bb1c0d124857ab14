import { useEffect } from 'react';

export const PRODUCT_NAME = 'Cristae';

/** "Cases · Cristae": the page's own name first, so a row of browser tabs and the history tell pages apart. */
export function pageTitle(title?: string | null): string {
  return title ? `${title} · ${PRODUCT_NAME}` : PRODUCT_NAME;
}

/**
 * Sets the document title while the page is shown. The shell resets it to the product name on every change of
 * route (in a layout effect, which runs before this effect), so a page that sets none never keeps another's.
 */
export function usePageTitle(title: string | null | undefined): void {
  useEffect(() => {
    if (title) document.title = pageTitle(title);
  }, [title]);
}
