import { createColumnHelper } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { DataTable, type DataTableClasses } from '@/components/ui/data-table';
import { TablePager, useServerTable, type PagingChange } from '@/components/ui/server-table';
import { paths } from '@/config/paths';
import { specimenTypeLabels } from '@/schemas/common';
import { cohortComplexes, cohortSortFields, type CohortComplex, type CohortFilter, type CohortMember, type CohortPage } from '@/schemas/registry';
import { reportSexLabels } from '@/schemas/report-document';
import { DEFAULT_PAGE_SIZE, pageSizes } from '../utils/cohort-params';

const col = createColumnHelper<CohortMember>();
const sortable = new Set<string>(cohortSortFields);

const classes: DataTableClasses = {
  head: 'border-b border-paper-line bg-matrix-50/60 text-xs text-matrix-900',
  headerCell: 'px-3 py-2 font-semibold',
  sortButton: 'inline-flex items-center gap-1 hover:text-copper-600',
  row: 'border-b border-paper-line/60 last:border-0 even:bg-paper/60',
  cell: 'px-3 py-2 align-top',
};

/** A member's ratio to CS for one complex, as % of the reference mean, with its place against the interval in words. */
function PctCell({ member, assay }: { member: CohortMember; assay: CohortComplex }) {
  const v = member.values.find((x) => x.assay === assay && x.measure === 'ratio_cs');
  if (!v || v.pctOfMean === null) return <span className="text-ink-faint">—</span>;
  const place = v.value === null || v.lower === null || v.upper === null ? null : v.value < v.lower ? 'below' : v.value > v.upper ? 'above' : null;
  return (
    <span className="num whitespace-nowrap">
      {Math.round(v.pctOfMean)}%
      {place ? <span className={`ml-1 text-xs font-semibold ${place === 'below' ? 'text-below' : 'text-above'}`}>{place}</span> : null}
    </span>
  );
}

type Props = {
  page: CohortPage | undefined;
  filter: CohortFilter;
  loading: boolean;
  dimmed: boolean;
  onChange: (c: PagingChange) => void;
  /** Pattern codes in words (the case list's wording, passed in by the page). */
  patternText: (code: string | null) => string;
};

/** The cohort's members, one signed specimen a row; paging and order run on the server. */
export function CohortTable({ page, filter, loading, dimmed, onChange, patternText }: Props) {
  const pageSize = filter.pageSize ?? DEFAULT_PAGE_SIZE;
  const pageNo = filter.page ?? 1;
  const total = page?.total ?? 0;

  const columns = useMemo(
    () => [
      col.accessor('accession', {
        header: 'Accession',
        cell: (c) => (
          <Link to={paths.caseDetail.href(c.row.original.caseId)} className="whitespace-nowrap font-mono font-medium text-matrix-700 hover:underline">
            {c.getValue()}
          </Link>
        ),
      }),
      col.accessor('specimenType', {
        header: 'Specimen',
        enableSorting: false,
        cell: (c) => <span className="whitespace-nowrap">{`${c.row.original.specimenLabel} · ${specimenTypeLabels[c.getValue()]}`}</span>,
      }),
      col.accessor('ageYears', { header: 'Age (y)', cell: (c) => <span className="num">{c.getValue() ?? '—'}</span> }),
      col.accessor('sex', { header: 'Sex', enableSorting: false, cell: (c) => reportSexLabels[c.getValue()] }),
      col.accessor('signedOn', {
        header: 'Report date',
        sortDescFirst: true,
        cell: (c) => (
          <span className="num whitespace-nowrap">
            {c.getValue()}
            {c.row.original.reportStatus === 'corrected' ? <span className="ml-1 text-xs text-copper-600">corrected v{c.row.original.reportVersion}</span> : null}
          </span>
        ),
      }),
      col.accessor('patternCode', { header: 'Pattern', enableSorting: false, cell: (c) => patternText(c.getValue()) }),
      ...cohortComplexes.slice(0, 4).map((assay) =>
        col.display({ id: `pct-${assay}`, header: `${assay}/CS`, cell: (c) => <PctCell member={c.row.original} assay={assay} /> }),
      ),
    ],
    [patternText],
  );

  const table = useServerTable({
    data: page?.items ?? [],
    columns,
    total,
    page: pageNo,
    pageSize,
    defaultPageSize: DEFAULT_PAGE_SIZE,
    defaultSort: 'signedOn',
    sort: filter.sort,
    dir: filter.dir,
    onChange,
  });

  return (
    <div className="flex flex-col gap-3">
      <div className={`overflow-hidden rounded-card border border-paper-line bg-paper-raised shadow-card transition-opacity ${dimmed ? 'opacity-60' : ''}`}>
        <DataTable
          label="Cohort members"
          table={table}
          classes={classes}
          canSort={(column) => sortable.has(column.id)}
          sortIndicator={(sorted) => <span aria-hidden="true" className="text-copper-600">{sorted === 'asc' ? '↑' : sorted === 'desc' ? '↓' : ''}</span>}
        >
          {!loading && total === 0 ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-10 text-center text-ink-soft">No signed case matches these criteria.</td>
            </tr>
          ) : null}
          {loading ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-10 text-center text-ink-faint"><span role="status">Finding the cohort…</span></td>
            </tr>
          ) : null}
        </DataTable>
      </div>
      <TablePager table={table} total={total} page={pageNo} pageSize={pageSize} pageSizes={pageSizes} noun="Members" loading={loading} />
    </div>
  );
}
