import { useQuery } from '@tanstack/react-query';
import { Loading, Notice } from '@/components/ui/layout';
import { reportQueries } from '../api/report-queries';
import { ReportVersions } from './report-versions';

/** The signed versions of one case, for laboratory pages (the case page composes it; staff read every report). */
export function CaseReportsPanel({ caseId, underAmendment = false }: { caseId: number; underAmendment?: boolean }) {
  const { data, isPending, error } = useQuery(reportQueries.ofCase(caseId));
  if (isPending) return <Loading what="Loading the reports" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return <ReportVersions reports={data} showInterpretation underAmendment={underAmendment} />;
}
