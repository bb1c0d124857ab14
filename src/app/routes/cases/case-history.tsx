import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { Loading, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { caseQueries } from '@/features/cases/api/case-queries';
import { CaseHistoryList } from '@/features/cases/components/case-history-list';
import { StatePill } from '@/features/cases/components/state-pill';
import { useLabTimeZone } from './use-lab-time-zone';

export default function CaseHistoryPage() {
  const id = Number(useParams().id);
  const { timeZone } = useLabTimeZone();
  const detail = useQuery(caseQueries.detail(id));
  return (
    <>
      <nav aria-label="Breadcrumb" className="mb-2 text-sm text-ink-soft">
        <Link to={paths.cases.href()} className="text-matrix-700 underline">
          Cases
        </Link>
        <span aria-hidden="true"> / </span>
        <Link to={paths.caseDetail.href(id)} className="font-mono text-matrix-700 underline">
          {detail.data?.accession ?? `case ${id}`}
        </Link>
        <span aria-hidden="true"> / </span>
        history
      </nav>
      <PageHeader
        title={detail.data ? `History of ${detail.data.accession}` : 'Case history'}
        docTitle={detail.data ? `${detail.data.accession} history` : undefined}
        lead="Every change to this case, its specimens and its patient's record, newest first. The trail cannot be edited or deleted."
        actions={detail.data ? <StatePill state={detail.data.state} /> : null}
      />
      <div className="max-w-4xl rounded-card border border-paper-line bg-paper-raised p-6 shadow-card">
        {timeZone ? <CaseHistoryList caseId={id} timeZone={timeZone} /> : <Loading />}
      </div>
    </>
  );
}
