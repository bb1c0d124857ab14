import { useQuery } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { Loading, Notice } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { ApiError } from '@/lib/api-client';
import type { CaseDetail } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { CaseHeader } from './case-header';
import { SpecimensPanel } from './specimens-panel';

/**
 * The case page's frame: the case header and the specimens, then whatever sections the route composes
 * below them (assay entry and results), each given the loaded case.
 */
export function CaseDetailLayout({
  caseId,
  timeZone,
  children,
}: {
  caseId: number;
  timeZone: string;
  children?: (detail: CaseDetail) => ReactNode;
}) {
  const query = useQuery(caseQueries.detail(caseId));
  const reload = () => void query.refetch();
  if (query.isPending) return <Loading what="Loading the case" />;
  if (query.error) {
    const missing = query.error instanceof ApiError && query.error.status === 404;
    return (
      <div className="flex flex-col gap-3">
        <Notice tone="error">{missing ? 'There is no case with this number.' : query.error.message}</Notice>
        <Link to={paths.cases.href()} className="text-sm text-matrix-700 underline">
          Back to the cases
        </Link>
      </div>
    );
  }
  const detail = query.data;
  return (
    <div className="flex flex-col gap-6">
      <nav aria-label="Breadcrumb" className="-mb-2 text-sm text-ink-soft">
        <Link to={paths.cases.href()} className="text-matrix-700 underline">
          Cases
        </Link>
        <span aria-hidden="true"> / </span>
        <span className="font-mono">{detail.accession}</span>
      </nav>
      <CaseHeader detail={detail} timeZone={timeZone} onReload={reload} />
      <SpecimensPanel detail={detail} timeZone={timeZone} onReload={reload} />
      {children?.(detail)}
    </div>
  );
}
