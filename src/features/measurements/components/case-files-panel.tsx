import { useQuery } from '@tanstack/react-query';
import { workupQueries } from '../api/workup-queries';
import { UploadsList } from './uploads-list';

/** The plate files kept with a case, for the case page. */
export function CaseFilesPanel({ caseId }: { caseId: number }) {
  const { data, error } = useQuery(workupQueries.detail(caseId));
  if (error) return <p className="text-sm text-below">{error.message}</p>;
  if (!data) return null;
  return (
    <div className="flex flex-col gap-1" data-testid="case-files">
      <h3 className="text-sm font-semibold text-ink-soft">Files kept with this case</h3>
      <UploadsList uploads={data.uploads} />
    </div>
  );
}
