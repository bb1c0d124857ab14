import { Link } from 'react-router-dom';
import { paths } from '@/config/paths';
import { usePageTitle } from '@/hooks/use-page-title';

export default function NotFoundPage() {
  usePageTitle('Page not found');
  return (
    <div className="mx-auto max-w-xl py-16 text-center">
      <p className="font-mono text-sm text-copper-600">404</p>
      <h1 className="mt-2 text-2xl font-semibold text-matrix-900">Nothing at this address</h1>
      <p className="mt-3 text-ink-soft">The page may have moved, or the link may be mistyped.</p>
      <Link className="mt-6 inline-block text-matrix-700 underline" to={paths.home.href()}>
        Back to your start page
      </Link>
    </div>
  );
}
