import type { Table } from '@tanstack/react-table';

/**
 * Below a server-paged table: which rows are shown of how many ("Cases 26–50 of 312"), the rows-per-page choice and
 * previous/next. Paging state stays with the caller's table (manualPagination).
 */
export function TablePager<T>({
  table,
  total,
  noun,
  pageSizes,
  isPending,
  isFetching,
}: {
  table: Table<T>;
  total: number;
  /** Plural, capitalised: "Cases", "Runs". */
  noun: string;
  pageSizes: readonly number[];
  isPending: boolean;
  isFetching: boolean;
}) {
  const { pageIndex, pageSize } = table.getState().pagination;
  const page = pageIndex + 1;
  const first = total === 0 ? 0 : pageIndex * pageSize + 1;
  const last = Math.min(page * pageSize, total);
  const n = (v: number) => v.toLocaleString('en-GB');
  return (
    <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-soft">
      <p role="status" aria-live="polite">
        {/* While the first page loads, the table says so; "No …" only once the answer is in. */}
        {isPending ? '' : total === 0 ? `No ${noun.toLowerCase()}` : `${noun} ${n(first)}–${n(last)} of ${n(total)}`}
        {isFetching && !isPending ? <span className="ml-2 text-ink-faint">updating…</span> : null}
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label className="flex items-center gap-1.5">
          Rows
          <select className="rounded border border-paper-line bg-paper-raised px-1.5 py-1" value={pageSize} onChange={(e) => table.setPageSize(Number(e.target.value))}>
            {pageSizes.map((size) => (
              <option key={size} value={size}>
                {size}
              </option>
            ))}
          </select>
        </label>
        <button type="button" className="rounded-md border border-paper-line px-2.5 py-1 hover:bg-paper-sunk disabled:opacity-40" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
          ← Previous
        </button>
        <span className="num">
          Page {page} of {n(table.getPageCount())}
        </span>
        <button type="button" className="rounded-md border border-paper-line px-2.5 py-1 hover:bg-paper-sunk disabled:opacity-40" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
          Next →
        </button>
      </div>
    </div>
  );
}
