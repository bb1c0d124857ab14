import { useMemo } from 'react';
import { useSearchParams } from 'react-router-dom';
import type { CohortCriteria } from '@/schemas/registry';
import { cohortQueryString, criteriaOf, readCohortParams } from '../utils/cohort-params';

/** GET /api/registry/export.csv with the cohort's criteria (no paging: every member is exported). */
export function registryExportHref(criteria: CohortCriteria, deidentified: boolean): string {
  const query = cohortQueryString(criteria);
  const flag = deidentified ? 'deidentified=true' : '';
  return `/api/registry/export.csv?${[query, flag].filter(Boolean).join('&')}`;
}

/**
 * The registry export of the cohort on screen, for directors: the de-identified file for research (HIPAA Safe
 * Harbor) first, the identified one beside it. The criteria come from the address bar unless given. The
 * browser downloads with the session cookie; the server audits every export.
 */
export function RegistryExportButton({ criteria }: { criteria?: CohortCriteria }) {
  const [params] = useSearchParams();
  const shown = useMemo(() => criteria ?? criteriaOf(readCohortParams(params).filter), [criteria, params]);
  return (
    <div className="flex flex-col items-end gap-1">
      <div className="flex flex-wrap items-center gap-2">
        <a
          className="inline-flex items-center rounded-md bg-matrix-700 px-3.5 py-1.5 text-sm font-medium text-white hover:bg-matrix-800"
          href={registryExportHref(shown, true)}
          download
        >
          Research export (de-identified CSV)
        </a>
        <a
          className="inline-flex items-center rounded-md border border-matrix-300 px-3 py-1.5 text-sm text-matrix-800 hover:bg-matrix-50"
          href={registryExportHref(shown, false)}
          download
        >
          Identified export (CSV)
        </a>
      </div>
      <p className="text-xs text-ink-soft">Every specimen the criteria select, not only this page. Each export is recorded in the audit trail.</p>
    </div>
  );
}
