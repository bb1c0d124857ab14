import { useQuery } from '@tanstack/react-query';
import { useCallback, useMemo } from 'react';
import { useSearchParams } from 'react-router-dom';
import { Card, Loading, Notice } from '@/components/ui/layout';
import type { CohortCriteria } from '@/schemas/registry';
import { registryQueries } from '../api/registry-queries';
import { cohortQueryString, criteriaOf, readCohortParams } from '../utils/cohort-params';
import { CohortFilterForm } from './cohort-filter-form';
import { CohortTable } from './cohort-table';
import { PctOfMeanPlot } from './pct-of-mean-plot';
import { RatioHistograms } from './ratio-histograms';
import { SavedSearches } from './saved-searches';

/**
 * The cohort page's body: criteria and saved searches, the two plots over the whole cohort, then its members.
 * The address bar holds the criteria and paging (the same query string the server reads).
 */
export function CohortView({ patternText }: { patternText: (code: string | null) => string }) {
  const [params, setParams] = useSearchParams();
  const { filter, problem } = useMemo(() => readCohortParams(params), [params]);
  const criteria = useMemo(() => criteriaOf(filter), [filter]);
  const cohort = useQuery(registryQueries.cohort(filter));
  const plots = useQuery(registryQueries.plots(criteria));

  const search = useCallback((c: CohortCriteria) => setParams(new URLSearchParams(cohortQueryString(c))), [setParams]);
  const change = useCallback(
    (c: Partial<Record<'page' | 'pageSize' | 'sort' | 'dir', string | number | null>>) =>
      setParams((cur) => {
        const next = new URLSearchParams(cur);
        for (const [k, v] of Object.entries(c)) {
          if (v === null || v === undefined || v === '') next.delete(k);
          else next.set(k, String(v));
        }
        return next;
      }, { replace: !('page' in c && c.page !== null) }),
    [setParams],
  );

  return (
    <div className="flex flex-col gap-5">
      {problem ? <Notice tone="error">{problem}</Notice> : null}
      <div className="grid gap-5 xl:grid-cols-[minmax(0,3fr)_minmax(16rem,1fr)]">
        <Card title="Criteria">
          {/* Re-mounted when the address bar changes (a saved search run, back button), so the form shows it. */}
          <CohortFilterForm key={cohortQueryString(criteria)} initial={criteria} onSearch={search} />
        </Card>
        <Card title="Saved searches">
          <SavedSearches current={criteria} onRun={(s) => search(s.filters)} />
        </Card>
      </div>

      {plots.error ? <Notice tone="error">{plots.error.message}</Notice> : null}
      {plots.data ? (
        <div className={`grid gap-5 transition-opacity 2xl:grid-cols-2 ${plots.isPlaceholderData ? 'opacity-60' : ''}`}>
          <Card title="Ratio to citrate synthase across the cohort">
            <RatioHistograms plots={plots.data} />
          </Card>
          <Card title="Percent of reference mean, per complex">
            <PctOfMeanPlot plots={plots.data} members={cohort.data?.items ?? []} />
          </Card>
        </div>
      ) : plots.isPending ? <Loading what="Drawing the plots" /> : null}

      {cohort.error ? <Notice tone="error">{cohort.error.message}</Notice> : null}
      <CohortTable
        page={cohort.data}
        filter={filter}
        loading={cohort.isPending}
        dimmed={cohort.isPlaceholderData}
        onChange={change}
        patternText={patternText}
      />
    </div>
  );
}
