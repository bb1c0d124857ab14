import { useQuery } from '@tanstack/react-query';
import { Loading, Notice, PageHeader, ResultsCaution } from '@/components/ui/layout';
import { definitionQueries } from '@/features/assay-definitions/api/definition-queries';
import { RateCheck } from '@/features/calculations/components/rate-check';

export default function RateCheckPage() {
  const { data, isPending, error } = useQuery(definitionQueries.current());
  return (
    <>
      <PageHeader
        title="Rate check"
        lead="Try one measurement before entering it on a case: paste the total and background readings, see the fitted lines, the specific activity and any flags, and move the window. Nothing here is saved."
      />
      <div className="flex flex-col gap-6">
        {isPending ? <Loading /> : error ? <Notice tone="error">{error.message}</Notice> : <RateCheck definitions={data} />}
        <ResultsCaution />
      </div>
    </>
  );
}
