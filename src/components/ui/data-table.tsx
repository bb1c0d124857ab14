import { flexRender, type Column, type SortDirection, type Table } from '@tanstack/react-table';
import type { ReactNode } from 'react';
import { TableBox } from './table-box';

/** Class names of the parts each table styles its own way; the <table> element itself is the same everywhere. */
export type DataTableClasses = {
  head: string;
  headerCell: string;
  sortButton: string;
  row: string;
  cell: string;
};

type DataTableProps<T> = {
  table: Table<T>;
  classes: DataTableClasses;
  /** What follows a sortable column's title inside its button, given the column's current direction. */
  sortIndicator: (sorted: false | SortDirection) => ReactNode;
  /** Narrows which columns offer a sort button; a column must also allow sorting in its definition. */
  canSort?: (column: Column<T, unknown>) => boolean;
  /** Rows after the data rows, e.g. an empty-list or loading message. */
  children?: ReactNode;
  /** Names the table's scrolling box for screen readers (the table scrolls sideways in it on narrow screens). */
  label?: string;
};

/**
 * The markup of a TanStack table: one header row per header group, where a sortable column's title is a
 * button that toggles its sort, then one row per row of the row model. State (data, paging, sorting, client
 * or server side) stays with the caller's useReactTable.
 */
export function DataTable<T>({ table, classes, sortIndicator, canSort, children, label = 'Table' }: DataTableProps<T>) {
  return (
    <TableBox label={label}>
    <table className="w-full text-left text-sm">
      <thead className={classes.head}>
        {table.getHeaderGroups().map((hg) => (
          <tr key={hg.id}>
            {hg.headers.map((h) => {
              const sorted = h.column.getIsSorted();
              const title = flexRender(h.column.columnDef.header, h.getContext());
              return (
                <th
                  key={h.id}
                  scope="col"
                  className={`relative ${classes.headerCell}`}
                  aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                >
                  {(canSort?.(h.column) ?? true) && h.column.getCanSort() ? (
                    // The button's ::after covers the whole header cell, so a click anywhere in the cell sorts.
                    <button
                      type="button"
                      className={`${classes.sortButton} after:absolute after:inset-0 after:content-['']`}
                      onClick={h.column.getToggleSortingHandler()}
                    >
                      {title}
                      {sortIndicator(sorted)}
                    </button>
                  ) : (
                    title
                  )}
                </th>
              );
            })}
          </tr>
        ))}
      </thead>
      <tbody>
        {table.getRowModel().rows.map((row) => (
          <tr key={row.id} className={classes.row}>
            {row.getVisibleCells().map((cell) => (
              <td key={cell.id} className={classes.cell}>
                {flexRender(cell.column.columnDef.cell, cell.getContext())}
              </td>
            ))}
          </tr>
        ))}
        {children}
      </tbody>
    </table>
    </TableBox>
  );
}
