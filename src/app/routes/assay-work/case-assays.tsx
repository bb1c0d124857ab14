import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { Card, Loading, Notice, PageHeader, ResultsCaution } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { workupQueries } from '@/features/measurements/api/workup-queries';
import { ManualEntry } from '@/features/measurements/components/manual-entry';
import { MeasurementsTable } from '@/features/measurements/components/measurements-table';
import { PlateImport } from '@/features/measurements/components/plate-import';
import { ProteinPanel } from '@/features/measurements/components/protein-panel';
import { UploadsList } from '@/features/measurements/components/uploads-list';
import { ApiError } from '@/lib/api-client';
import { caseStateLabels, type CaseState } from '@/schemas/case';
import NotFoundPage from '../not-found';

type Tab = 'plate' | 'traces' | 'rates';
const tabs: { id: Tab; label: string }[] = [
  { id: 'plate', label: 'Plate file' },
  { id: 'traces', label: 'Paste readings' },
  { id: 'rates', label: 'Type rates' },
];

export default function CaseAssaysPage() {
  const caseId = Number(useParams().id);
  const { data: workup, isPending, error } = useQuery(workupQueries.detail(caseId));
  const [tab, setTab] = useState<Tab>('plate');

  if (isPending) return <Loading what="Loading the assay work" />;
  if (error) return error instanceof ApiError && error.status === 404 ? <NotFoundPage /> : <Notice tone="error">{error.message}</Notice>;
  const accepted = workup.specimens.filter((s) => s.accepted);
  const rejected = workup.specimens.filter((s) => !s.accepted);

  return (
    <>
      <PageHeader
        title={`Assay bench · ${workup.accession}`}
        docTitle={`${workup.accession} assay bench`}
        lead={`${workup.patientName} · ${caseStateLabels[workup.state as CaseState] ?? workup.state}`}
        actions={
          <>
            <Link className="rounded-md px-3 py-1.5 text-sm text-matrix-700 hover:bg-matrix-50" to={paths.caseDetail.href(caseId)}>
              Case
            </Link>
            <Link className="rounded-md bg-matrix-700 px-3 py-1.5 text-sm font-medium text-white hover:bg-matrix-800" to={paths.caseResults.href(caseId)}>
              Results
            </Link>
          </>
        }
      />
      <div className="flex flex-col gap-6">
        {workup.returnReason && workup.state === 'in_assay' ? <Notice tone="error">Returned by the director for more work: {workup.returnReason}</Notice> : null}
        {!workup.editable ? (
          <Notice>
            This case is {caseStateLabels[workup.state as CaseState]?.toLowerCase() ?? workup.state}: its assay results are read-only.
          </Notice>
        ) : null}
        <ResultsCaution />
        <Card title="Protein of each homogenate">
          <div className="flex flex-col gap-4 divide-y divide-paper-line">
            {accepted.map((s) => (
              <div key={s.id} className="pt-3 first:pt-0">
                <ProteinPanel caseId={caseId} specimen={s} editable={workup.editable} />
              </div>
            ))}
            {accepted.length === 0 ? <p className="text-sm text-ink-faint">No accepted specimen on this case.</p> : null}
            {rejected.map((s) => (
              <p key={s.id} className="pt-3 text-sm text-ink-soft">
                Specimen {s.label} was rejected on receipt ({s.rejectionReason}); no assays are recorded on it.
              </p>
            ))}
          </div>
        </Card>
        {workup.editable ? (
          <Card title="Enter assay results">
            <div role="tablist" aria-label="How the results are entered" className="mb-4 flex gap-1 border-b border-paper-line">
              {tabs.map((t) => (
                <button
                  key={t.id}
                  role="tab"
                  type="button"
                  aria-selected={tab === t.id}
                  onClick={() => setTab(t.id)}
                  className={`-mb-px rounded-t-md border px-3 py-1.5 text-sm ${tab === t.id ? 'border-paper-line border-b-paper-raised bg-paper-raised font-medium text-matrix-900' : 'border-transparent text-ink-soft hover:text-matrix-700'}`}
                >
                  {t.label}
                </button>
              ))}
            </div>
            <div role="tabpanel" aria-label={tabs.find((t) => t.id === tab)!.label}>
              {tab === 'plate' ? (
                <div className="flex flex-col gap-2">
                  <PlateImport caseId={caseId} specimens={workup.specimens} />
                  <p className="text-xs text-ink-faint">
                    Layouts are made and edited under{' '}
                    <Link className="underline" to={paths.plateMaps.href()}>
                      Plate layouts
                    </Link>
                    .
                  </p>
                </div>
              ) : (
                <ManualEntry key={tab} caseId={caseId} specimens={workup.specimens} mode={tab} saved={workup.measurements} />
              )}
            </div>
          </Card>
        ) : null}
        <Card title="Saved measurements">
          <MeasurementsTable workup={workup} />
        </Card>
        <Card title="Files kept with this case">
          <UploadsList uploads={workup.uploads} />
        </Card>
        <div>
          <Link className="inline-flex rounded-md border border-matrix-300 px-3.5 py-1.5 text-sm font-medium text-matrix-800 hover:bg-matrix-50" to={paths.caseResults.href(caseId)}>
            See the results
          </Link>
        </div>
      </div>
    </>
  );
}
