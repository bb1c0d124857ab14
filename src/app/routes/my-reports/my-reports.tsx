import { PageHeader, ResultsCaution } from '@/components/ui/layout';
import { MyReports } from '@/features/reports/components/my-reports';

export default function MyReportsPage() {
  return (
    <>
      <PageHeader
        title="Reports for my patients"
        lead="Signed reports of the cases you referred. When a report is corrected, the new version is shown first and the earlier one stays available, marked as superseded."
      />
      <div className="flex flex-col gap-5">
        <ResultsCaution />
        <MyReports />
      </div>
    </>
  );
}
