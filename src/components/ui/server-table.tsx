import { getCoreRowModel, useReactTable, type ColumnDef, type SortingState, type Table, type Updater } from '@tanstack/react-table';

/** A change to a server-paged view's paging or order; null removes the parameter (its default applies). */
export type PagingChange = Partial<Record<'page' | 'pageSize' | 'sort' | 'dir', string | number | null>>;

type ServerTableOptions<T> = {
  data: T[];
  // TanStack's column helper yields columns of differing value types; the table accepts them all.
  columns: ColumnDef<T, never>[];
  total: number;
  page: number;
  pageSize: number;
  defaultPageSize: number;
  /** The sort when none is chosen, newest first. */
  defaultSort: string;
  sort?: string;
  dir?: 'asc' | 'desc';
  onChange: (c: PagingChange) => void;
};

/**
 * A TanStack table whose paging and sorting run on the server: the state comes from the caller (the address
 * bar), and every change goes back through onChange with defaults written as null. A new order or page size
 * returns to the first page.
 */
export function useServerTable<T>(o: ServerTableOptions<T>): Table<T> {
  const id = o.sort ?? o.defaultSort;
  const sorting: SortingState = [{ id, desc: (o.dir ?? (id === o.defaultSort ? 'desc' : 'asc')) === 'desc' }];
  return useReactTable({
    data: o.data,
    columns: o.columns,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    enableSortingRemoval: false,
    enableMultiSort: false,
    pageCount: Math.max(1, Math.ceil(o.total / o.pageSize)),
    state: { sorting, pagination: { pageIndex: o.page - 1, pageSize: o.pageSize } },
    onSortingChange: (updater: Updater<SortingState>) => {
      const s = (typeof updater === 'function' ? updater(sorting) : updater)[0];
      if (!s) return;
      const isDefault = s.id === o.defaultSort && s.desc;
      o.onChange({ sort: isDefault ? null : s.id, dir: isDefault ? null : s.desc ? 'desc' : 'asc', page: null });
    },
    onPaginationChange: (updater) => {
      const next = typeof updater === 'function' ? updater({ pageIndex: o.page - 1, pageSize: o.pageSize }) : updater;
      if (next.pageSize !== o.pageSize) o.onChange({ pageSize: next.pageSize === o.defaultPageSize ? null : next.pageSize, page: null });
      else o.onChange({ page: next.pageIndex === 0 ? null : next.pageIndex + 1 });
    },
  });
}

const pagerButton = 'rounded-md border border-paper-line px-2.5 py-1 hover:bg-paper-sunk disabled:opacity-40';

/** Under a server-paged table: which rows show out of how many, rows per page, and the page buttons. */
export function TablePager<T>({ table, total, page, pageSize, pageSizes, noun, loading }: {
  table: Table<T>;
  total: number;
  page: number;
  pageSize: number;
  pageSizes: readonly number[];
  /** Plural, capitalised: "Members". */
  noun: string;
  loading: boolean;
}) {
  const first = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = Math.min(page * pageSize, total);
  return (
    <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-soft">
      <p role="status" aria-live="polite">
        {loading ? '' : total === 0 ? `No ${noun.toLowerCase()}` : `${noun} ${first.toLocaleString('en-GB')}–${last.toLocaleString('en-GB')} of ${total.toLocaleString('en-GB')}`}
      </p>
      <div className="flex items-center gap-2">
        <label className="flex items-center gap-1.5">
          Rows
          <select className="rounded border border-paper-line bg-paper-raised px-1.5 py-1" value={pageSize} onChange={(e) => table.setPageSize(Number(e.target.value))}>
            {pageSizes.map((n) => <option key={n} value={n}>{n}</option>)}
          </select>
        </label>
        <button type="button" className={pagerButton} onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
          Previous page
        </button>
        <span className="num">Page {page} of {table.getPageCount().toLocaleString('en-GB')}</span>
        <button type="button" className={pagerButton} onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
          Next page
        </button>
      </div>
    </div>
  );
}
