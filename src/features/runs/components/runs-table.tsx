import { useQuery } from '@tanstack/react-query';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { DataTable, type DataTableClasses } from '@/components/ui/data-table';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { TablePager } from '@/components/ui/table-pager';
import { paths } from '@/config/paths';
import { runListQuerySchema, runQcStatuses, runQcStatusLabels, type RunListQuery, type RunSummary } from '@/schemas/run';
import { formatWhen } from '@/utils/format';
import { runQueries } from '../api/run-queries';
import { QcStatusBadge } from './qc-status';

const col = createColumnHelper<RunSummary>();
const PAGE_SIZES = [25, 50, 100];

const classes: DataTableClasses = {
  head: 'border-b border-paper-line bg-paper-sunk/60 text-xs uppercase tracking-wide text-ink-soft',
  headerCell: 'px-3 py-2.5 font-medium',
  sortButton: 'inline-flex items-center gap-1',
  row: 'border-b border-paper-line/60 last:border-0 hover:bg-matrix-50/40',
  cell: 'px-3 py-2.5 align-middle',
};

/** The page's query from the address bar; anything unreadable falls back to the defaults. */
function readQuery(params: URLSearchParams): RunListQuery {
  const parsed = runListQuerySchema.safeParse(Object.fromEntries(params));
  return parsed.success ? parsed.data : {};
}

/** Analytical runs, newest first, paged on the server; the address bar keeps the page, status and search. */
export function RunsTable() {
  const [params, setParams] = useSearchParams();
  const query = useMemo(() => readQuery(params), [params]);
  const page = query.page ?? 1;
  const pageSize = query.pageSize ?? PAGE_SIZES[0]!;
  const { data, error, isPending, isFetching } = useQuery(runQueries.list({ ...query, page, pageSize }));

  const change = (c: Partial<Record<keyof RunListQuery, string | number | null>>) =>
    setParams((cur) => {
      const next = new URLSearchParams(cur);
      for (const [k, v] of Object.entries(c)) {
        if (v === null || v === '') next.delete(k);
        else next.set(k, String(v));
      }
      if (!('page' in c)) next.delete('page');
      return next;
    });

  const columns = useMemo(
    () => [
      col.accessor('runNumber', {
        header: 'Run',
        cell: (c) => (
          <Link to={paths.runDetail.href(c.row.original.id)} className="whitespace-nowrap font-mono font-medium text-matrix-700 hover:underline">
            {c.getValue()}
          </Link>
        ),
      }),
      col.accessor('startedAt', { header: 'Read at', cell: (c) => <span className="num whitespace-nowrap">{formatWhen(c.getValue())}</span> }),
      col.accessor('instrument', { header: 'Instrument' }),
      col.accessor('operator', { header: 'Operator', cell: (c) => c.getValue() ?? '—' }),
      col.accessor('plateFormat', { header: 'Plate', cell: (c) => <span className="num">{c.getValue()} wells</span> }),
      col.accessor('caseCount', { header: 'Cases', cell: (c) => <span className="num">{c.getValue()}</span> }),
      col.accessor('qcStatus', {
        header: 'Quality control',
        cell: (c) => <QcStatusBadge status={c.getValue()} overridden={c.row.original.override !== null} />,
      }),
    ],
    [],
  );

  const total = data?.total ?? 0;
  const table = useReactTable({
    data: data?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    enableSorting: false,
    pageCount: Math.max(1, Math.ceil(total / pageSize)),
    state: { pagination: { pageIndex: page - 1, pageSize } },
    onPaginationChange: (updater) => {
      const next = typeof updater === 'function' ? updater({ pageIndex: page - 1, pageSize }) : updater;
      if (next.pageSize !== pageSize) change({ pageSize: next.pageSize });
      else change({ page: next.pageIndex === 0 ? null : next.pageIndex + 1 });
    },
  });

  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 sm:grid-cols-[2fr_1fr]">
        <TextField label="Search" placeholder="Run number or instrument" defaultValue={query.q ?? ''} onChange={(e) => change({ q: e.target.value.trim() || null })} />
        <SelectField
          label="Quality control"
          value={query.status ?? ''}
          onChange={(e) => change({ status: e.target.value || null })}
          options={[{ value: '', label: 'Any' }, ...runQcStatuses.map((s) => ({ value: s, label: runQcStatusLabels[s] }))]}
        />
      </div>
      {error ? <Notice tone="error">{error.message}</Notice> : null}
      <div className="rounded-card border border-paper-line bg-paper-raised shadow-card">
        <DataTable table={table} classes={classes} sortIndicator={() => null} label="Analytical runs">
          {isPending ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-10 text-center text-ink-faint">
                <span role="status">Loading runs…</span>
              </td>
            </tr>
          ) : total === 0 ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-10 text-center text-ink-soft">
                {query.q || query.status ? 'No run matches this search.' : 'No run has been saved yet.'}
              </td>
            </tr>
          ) : null}
        </DataTable>
      </div>
      <TablePager table={table} total={total} noun="Runs" pageSizes={PAGE_SIZES} isPending={isPending} isFetching={isFetching} />
    </div>
  );
}
