import { useParams } from 'react-router-dom';
import { Loading } from '@/components/ui/layout';
import { CaseDetailLayout } from '@/features/cases/components/case-detail-layout';
import { CaseFilesPanel } from '@/features/measurements/components/case-files-panel';
import { CaseReportsPanel } from '@/features/reports/components/case-reports-panel';
import { WorkupSummaryPanel } from '@/features/results/components/workup-summary-panel';
import type { CaseDetail } from '@/schemas/case';
import { useLabTimeZone } from './use-lab-time-zone';

/*
 * The case page. CaseDetailLayout draws the case header and the specimens; the function passed as its child
 * draws the sections below them and receives the loaded case.
 *
 * Assay entry and results (src/features/measurements) go in CaseWorkSections: replace the placeholder with the
 * measurements panel, e.g. <MeasurementsPanel detail={detail} timeZone={timeZone} />.
 */
function CaseWorkSections({ detail }: { detail: CaseDetail; timeZone: string }) {
  // A reopened case keeps its signed reports on view, with the note that a corrected version will follow.
  const signed = detail.state === 'final' || detail.state === 'corrected' || detail.amendReason !== null;
  return (
    <>
    <section aria-labelledby="work-area-title" data-slot="case-work" className="rounded-card border border-paper-line bg-paper-raised p-5 shadow-card">
      <h2 id="work-area-title" className="mb-3 text-lg font-semibold text-matrix-900">
        Assay entry and results
      </h2>
      <div className="flex flex-col gap-4">
        <WorkupSummaryPanel caseId={detail.id} />
        <CaseFilesPanel caseId={detail.id} />
      </div>
    </section>
    {signed ? (
      <section aria-labelledby="reports-title" className="rounded-card border border-paper-line bg-paper-raised p-5 shadow-card">
        <h2 id="reports-title" className="mb-3 text-lg font-semibold text-matrix-900">
          Signed reports
        </h2>
        <CaseReportsPanel caseId={detail.id} underAmendment={detail.amendReason !== null} />
      </section>
    ) : null}
    </>
  );
}

export default function CaseDetailPage() {
  const id = Number(useParams().id);
  const { timeZone } = useLabTimeZone();
  if (!timeZone) return <Loading />;
  return (
    <CaseDetailLayout key={id} caseId={id} timeZone={timeZone}>
      {(detail) => <CaseWorkSections detail={detail} timeZone={timeZone} />}
    </CaseDetailLayout>
  );
}
