import { Link } from 'react-router-dom';
import { Loading, Notice, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { CasesTable } from '@/features/cases/components/cases-table';
import { useLabTimeZone } from './use-lab-time-zone';

export default function CaseListPage() {
  const { timeZone, notice } = useLabTimeZone();
  return (
    <>
      <PageHeader
        title="Cases"
        lead="Every case in the registry. Search by accession number, patient or lab patient ID; the address bar keeps this view, so it can be bookmarked or shared."
        actions={
          <Link to={paths.caseNew.href()} className="inline-flex items-center rounded-md bg-matrix-700 px-3.5 py-1.5 text-sm font-medium text-white hover:bg-matrix-800">
            Register a case
          </Link>
        }
      />
      {notice ? (
        <div className="mb-4">
          <Notice tone="info">{notice}</Notice>
        </div>
      ) : null}
      {timeZone ? <CasesTable timeZone={timeZone} /> : <Loading />}
    </>
  );
}
