import { PageHeader, ResultsCaution } from '@/components/ui/layout';
import { InProgressCases } from '@/features/reports/components/in-progress-cases';
import { MyReports } from '@/features/reports/components/my-reports';

export default function MyReportsPage() {
  return (
    <>
      <PageHeader
        title="Reports for my patients"
        lead="The cases you referred: those the laboratory is still working on, then the signed reports. When a report is corrected, the new version is shown first and the earlier one stays available, marked as superseded."
      />
      <div className="flex flex-col gap-5">
        <ResultsCaution />
        <InProgressCases />
        <h2 className="text-lg font-semibold text-matrix-900">Signed reports</h2>
        <MyReports />
      </div>
    </>
  );
}
