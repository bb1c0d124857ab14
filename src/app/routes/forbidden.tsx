import { Link } from 'react-router-dom';
import { paths } from '@/config/paths';
import { usePageTitle } from '@/hooks/use-page-title';

export default function ForbiddenPage() {
  usePageTitle('Not part of your role');
  return (
    <div className="mx-auto max-w-xl py-16 text-center">
      <p className="font-mono text-sm text-copper-600">403</p>
      <h1 className="mt-2 text-2xl font-semibold text-matrix-900">This page is not part of your role</h1>
      <p className="mt-3 text-ink-soft">
        Your account does not give access to this page. If you need it for your work, ask the laboratory&apos;s
        administrator to review your role.
      </p>
      <Link className="mt-6 inline-block text-matrix-700 underline" to={paths.home.href()}>
        Back to your start page
      </Link>
    </div>
  );
}
