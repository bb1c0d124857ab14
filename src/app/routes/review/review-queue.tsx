import { Card, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { SignedReports } from '@/features/reports/components/signed-reports';
import { ReviewQueue } from '@/features/review/components/review-queue';

export default function ReviewQueuePage() {
  return (
    <>
      <PageHeader
        title="Awaiting sign-out"
        lead="Cases the technologists have submitted, urgent first and then the longest waiting. Open one to read the results, write the interpretation and sign, or return it with a reason."
      />
      <div className="flex flex-col gap-6">
        <Card title="Your queue">
          <ReviewQueue caseHref={paths.reviewCase.href} />
        </Card>
        <Card title="Recently signed">
          <SignedReports caseHref={paths.reviewCase.href} />
        </Card>
      </div>
    </>
  );
}
