import { isRouteErrorResponse, useRouteError } from 'react-router-dom';
import { usePageTitle } from '@/hooks/use-page-title';

export function RouteError() {
  usePageTitle('Page could not be shown');
  const err = useRouteError();
  const text = isRouteErrorResponse(err) ? `${err.status} ${err.statusText}` : err instanceof Error ? err.message : 'Unknown error';
  return (
    <div className="mx-auto max-w-xl py-16">
      <h1 className="text-xl font-semibold text-below">This page could not be shown</h1>
      <p className="mt-2 text-ink-soft">{text}</p>
      <a className="mt-4 inline-block text-matrix-700 underline" href="/">
        Start again
      </a>
    </div>
  );
}
