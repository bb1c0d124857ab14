import { useQuery } from '@tanstack/react-query';
import {
  createColumnHelper,
  getCoreRowModel,
  useReactTable,
  type SortingState,
  type Updater,
} from '@tanstack/react-table';
import { useCallback, useMemo } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { DataTable, type DataTableClasses } from '@/components/ui/data-table';
import { Notice } from '@/components/ui/layout';
import { TablePager } from '@/components/ui/table-pager';
import { paths } from '@/config/paths';
import { specimenTypeLabels } from '@/schemas/common';
import { caseSortFields, type CaseListQuery, type CaseSummary } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { formatLabDateTime } from '../utils/lab-time';
import { DEFAULT_PAGE_SIZE, hasFilters, pageSizes, readListParams, writeListParams } from '../utils/list-params';
import { CaseFilters } from './case-filters';
import { StatePill } from './state-pill';

const col = createColumnHelper<CaseSummary>();
const sortable = new Set<string>(caseSortFields);

const caseTableClasses: DataTableClasses = {
  head: 'border-b border-paper-line bg-paper-sunk/60 text-xs uppercase tracking-wide text-ink-soft',
  headerCell: 'px-3 py-2.5 font-medium',
  sortButton: 'inline-flex items-center gap-1 uppercase tracking-wide hover:text-matrix-800',
  row: 'border-b border-paper-line/60 last:border-0 hover:bg-matrix-50/40',
  cell: 'px-3 py-2.5 align-middle',
};

const kindWords: Record<string, string> = {
  normal: 'Within reference',
  isolated: 'Isolated',
  combined: 'Combined',
  linked: 'Linked low',
  raised_cs: 'Raised CS',
  insufficient: 'Not enough data',
};

/** A results pattern code ("isolated:CI+raised_cs; normal") in words: "Isolated CI, raised CS; within reference". */
export function patternText(code: string | null): string {
  if (!code) return '—';
  return code
    .split('; ')
    .map((specimen) => {
      // Findings are joined by "+", which also appears inside a linked activity ("linked:CI+III").
      const findings: string[] = [];
      for (const part of specimen.split('+')) {
        if (findings.length && !(part.split(':')[0]! in kindWords)) findings[findings.length - 1] += `+${part}`;
        else findings.push(part);
      }
      return findings
        .map((f, i) => {
          const [kind, complexes] = f.split(':') as [string, string | undefined];
          const words = kindWords[kind] ?? kind;
          const text = complexes ? `${words} ${complexes.split(',').join(', ')}` : words;
          return i === 0 ? text : text.charAt(0).toLowerCase() + text.slice(1);
        })
        .join(', ');
    })
    .join('; ');
}

/**
 * The registry's case list. Paging, sorting, search and filters all run on the server; their state is the
 * address bar's query string, so any view can be bookmarked or sent to a colleague.
 */
export function CasesTable({ timeZone }: { timeZone: string }) {
  const [params, setParams] = useSearchParams();
  const query = useMemo(() => readListParams(params), [params]);
  const pageSize = query.pageSize ?? DEFAULT_PAGE_SIZE;
  const page = query.page ?? 1;
  const { data, error, isPending, isPlaceholderData, isFetching } = useQuery(caseQueries.list({ ...query, page, pageSize }));

  const change = useCallback(
    (c: Partial<Record<keyof CaseListQuery, string | number | null>>) => setParams((cur) => writeListParams(cur, c), { replace: !('page' in c) }),
    [setParams],
  );

  const sorting: SortingState = [{ id: query.sort ?? 'receivedAt', desc: (query.dir ?? (query.sort && query.sort !== 'receivedAt' ? 'asc' : 'desc')) === 'desc' }];
  const onSortingChange = (updater: Updater<SortingState>) => {
    const next = typeof updater === 'function' ? updater(sorting) : updater;
    const s = next[0];
    if (s) change({ sort: s.id === 'receivedAt' && s.desc ? null : s.id, dir: s.id === 'receivedAt' && s.desc ? null : s.desc ? 'desc' : 'asc' });
  };

  const columns = useMemo(
    () => [
      col.accessor('accession', {
        header: 'Accession',
        cell: (c) => (
          <Link to={paths.caseDetail.href(c.row.original.id)} className="whitespace-nowrap font-mono font-medium text-matrix-700 hover:underline">
            {c.getValue()}
          </Link>
        ),
      }),
      col.accessor('patientName', { header: 'Patient' }),
      col.accessor('specimenTypes', {
        header: 'Specimens',
        enableSorting: false,
        cell: (c) => c.getValue().map((t) => specimenTypeLabels[t]).join(', ') || '—',
      }),
      col.accessor('receivedAt', { header: 'Received', sortDescFirst: true, cell: (c) => <span className="num whitespace-nowrap">{formatLabDateTime(c.getValue(), timeZone)}</span> }),
      col.accessor('priority', {
        header: 'Priority',
        cell: (c) => (c.getValue() === 'urgent' ? <span className="text-xs font-semibold uppercase tracking-wide text-copper-600">Urgent</span> : <span className="text-ink-faint">Routine</span>),
      }),
      col.accessor('referringClinicianName', { header: 'Referred by', enableSorting: false, cell: (c) => c.getValue() ?? '—' }),
      col.accessor('state', { header: 'State', cell: (c) => <StatePill state={c.getValue()} /> }),
      col.accessor('patternCode', { header: 'Pattern', enableSorting: false, cell: (c) => <span className="text-ink-soft">{patternText(c.getValue())}</span> }),
    ],
    [timeZone],
  );

  const total = data?.total ?? 0;
  const table = useReactTable({
    data: data?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    enableSortingRemoval: false,
    enableMultiSort: false,
    pageCount: Math.max(1, Math.ceil(total / pageSize)),
    state: { sorting, pagination: { pageIndex: page - 1, pageSize } },
    onSortingChange,
    onPaginationChange: (updater) => {
      const next = typeof updater === 'function' ? updater({ pageIndex: page - 1, pageSize }) : updater;
      if (next.pageSize !== pageSize) change({ pageSize: next.pageSize === DEFAULT_PAGE_SIZE ? null : next.pageSize });
      else change({ page: next.pageIndex === 0 ? null : next.pageIndex + 1 });
    },
  });


  return (
    <div className="flex flex-col gap-4">
      <CaseFilters query={query} onChange={change} />
      {error ? <Notice tone="error">{error.message}</Notice> : null}
      <div className={`overflow-hidden rounded-card border border-paper-line bg-paper-raised shadow-card transition-opacity ${isPlaceholderData ? 'opacity-60' : ''}`}>
        <DataTable
          label="Cases"
          table={table}
          classes={caseTableClasses}
          canSort={(column) => sortable.has(column.id)}
          sortIndicator={(sorted) => (
            <span aria-hidden="true" className={sorted ? 'text-copper-600' : 'text-ink-faint/50'}>
              {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
            </span>
          )}
        >
          {!isPending && total === 0 ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-10 text-center text-ink-soft">
                {hasFilters(query) ? 'No cases match this search and these filters.' : 'No cases have been registered yet.'}
              </td>
            </tr>
          ) : null}
          {isPending ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-10 text-center text-ink-faint">
                <span role="status">Loading cases…</span>
              </td>
            </tr>
          ) : null}
        </DataTable>
      </div>
      <TablePager table={table} total={total} noun="Cases" pageSizes={pageSizes} isPending={isPending} isFetching={isFetching} />
    </div>
  );
}
