import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { useRecordId } from '@/hooks/use-record-id';
import { Card, Loading, Notice, PageHeader, ResultsCaution } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { reportKeys, reportPdfHref } from '@/features/reports/api/report-queries';
import { resultsQueries } from '@/features/results/api/results-queries';
import { ResultsView } from '@/features/results/components/results-view';
import { ReportVersions } from '@/features/reports/components/report-versions';
import { AmendPanel } from '@/features/review/components/amend-panel';
import { reviewQueries } from '@/features/review/api/review-queries';
import { CaseOverview } from '@/features/review/components/case-overview';
import { CorrectionPanel } from '@/features/review/components/correction-panel';
import { ReturnPanel } from '@/features/review/components/return-panel';
import { SignOutPanel } from '@/features/review/components/sign-out-panel';
import { ApiError } from '@/lib/api-client';
import type { SignResult } from '@/schemas/report';
import NotFoundPage from '../not-found';

function CaseResults({ caseId }: { caseId: number }) {
  const { data, isPending, error } = useQuery(resultsQueries.detail(caseId));
  if (isPending) return <Loading what="Loading the results" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return <ResultsView results={data} />;
}

function ReviewCase({ caseId }: { caseId: number }) {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const { data: review, isPending, error } = useQuery(reviewQueries.case(caseId));
  const [signed, setSigned] = useState<SignResult | null>(null);

  if (isPending) return <Loading what="Loading the case" />;
  if (error) {
    if (error instanceof ApiError && error.status === 404) return <NotFoundPage />;
    return <Notice tone="error">{error.message}</Notice>;
  }
  const onSigned = async (r: SignResult) => {
    await qc.invalidateQueries({ queryKey: reportKeys.all });
    setSigned(r);
    window.scrollTo({ top: 0 });
  };
  const c = review.case;
  const current = review.reports.find((r) => r.status !== 'superseded') ?? null;
  // Reopened after signing: the next signature is a correction of the signed version, never a first signature.
  const amending = c.amendReason !== null && current !== null;
  const onAmended = async () => {
    // The case, its results (live again while in assay) and its reports all read differently now.
    await qc.invalidateQueries();
    setSigned(null);
    window.scrollTo({ top: 0 });
  };

  return (
    <>
      <PageHeader
        title={`${c.accession} · ${c.patient.familyName}, ${c.patient.givenName}`}
        docTitle={`${c.accession} sign-out review`}
        lead={
          <Link className="text-matrix-700 underline" to={paths.review.href()}>
            ← Back to the queue
          </Link>
        }
      />
      <div className="flex flex-col gap-6">
        {signed ? (
          <Notice tone="success">
            Version {signed.report.version} is signed and stored ({signed.report.status === 'corrected' ? 'corrected report' : 'final report'}).{' '}
            {c.referringClinician.name} is being e-mailed.{' '}
            <a className="underline" href={reportPdfHref(signed.report.id)} download>
              Download the PDF
            </a>
          </Notice>
        ) : null}
        {amending ? (
          <Notice>
            <strong className="font-semibold">Reopened after signing.</strong> {c.amendReason}{' '}
            {c.state === 'awaiting_review'
              ? 'The corrected results are submitted: check them, then sign the correction below.'
              : 'The technologists are correcting the results; when they submit the case again, you sign the correction here.'}
          </Notice>
        ) : null}
        <Card title="Case">
          <CaseOverview review={review} />
        </Card>
        <Card
          title="Results"
          actions={
            <Link className="text-sm text-matrix-700 underline" to={paths.caseDetail.href(c.id)}>
              Open the case: traces, uploads and history
            </Link>
          }
        >
          <CaseResults caseId={c.id} />
        </Card>
        <ResultsCaution />
        {c.state === 'awaiting_review' && amending ? (
          <Card title="Sign the correction">
            <CorrectionPanel key={current.id} review={review} current={current} onCorrected={onSigned} />
          </Card>
        ) : null}
        {c.state === 'awaiting_review' ? (
          <>
            {amending ? null : (
              <Card title="Interpretation and signature">
                <SignOutPanel review={review} onSigned={onSigned} />
              </Card>
            )}
            <Card title="Not ready to sign?">
              <ReturnPanel caseDetail={c} onReturned={() => navigate(paths.review.href())} />
            </Card>
          </>
        ) : null}
        {c.state !== 'awaiting_review' && review.reports.length === 0 ? (
          <Notice>This case is not awaiting review, and no report has been signed for it.</Notice>
        ) : null}
        {review.reports.length > 0 ? (
          <Card title="Signed reports">
            <div className="flex flex-col gap-4">
              <ReportVersions reports={review.reports} showInterpretation underAmendment={amending} />
              {current && (c.state === 'final' || c.state === 'corrected') ? (
                <div className="flex flex-wrap gap-3">
                  <AmendPanel key={`amend-${c.version}`} caseDetail={c} current={current} onAmended={onAmended} />
                  <CorrectionPanel key={current.id} review={review} current={current} onCorrected={onSigned} />
                </div>
              ) : null}
            </div>
          </Card>
        ) : null}
      </div>
    </>
  );
}

export default function ReviewCasePage() {
  const numeric = useRecordId();
  if (numeric === null) return <NotFoundPage />;
  return <ReviewCase key={numeric} caseId={numeric} />;
}
