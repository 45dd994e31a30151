import { flexRender, type ColumnDef, type Header, type Row, type RowData, type Table } from '@tanstack/react-table';
import type { ReactNode } from 'react';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Select } from '@/components/ui/input';
import { ScrollRegion } from '@/components/ui/scroll-region';
import { Spinner } from '@/components/ui/spinner';
import { problemMessage } from '@/lib/api-client';
import { cn } from '@/utils/cn';

declare module '@tanstack/react-table' {
  // eslint-disable-next-line @typescript-eslint/no-unused-vars -- the augmented interface must repeat the library's type parameters
  interface ColumnMeta<TData extends RowData, TValue> {
    /** Classes for this column's header and cells (width, alignment). */
    className?: string;
    /** The column's name on a phone's card, when its header is not plain text ('' for none). */
    label?: string;
  }
}

/**
 * A list that could not be loaded: what went wrong and a Retry, never the list's empty-state text
 * (which would claim there is nothing).
 */
export const LoadError = ({ error, onRetry, what = 'The list', className }: { error: unknown; onRetry?: () => void; what?: string; className?: string }) => (
  <Alert tone="error" title={`${what} could not be loaded`} className={cn('text-left', className)}>
    <div className="flex flex-wrap items-center justify-between gap-2">
      <span className="min-w-0">{problemMessage(error)}</span>
      {onRetry ? (
        <Button variant="secondary" size="sm" onClick={onRetry}>
          Retry
        </Button>
      ) : null}
    </div>
  </Alert>
);

export interface DataTableProps<T> {
  /** A table made with `useReactTable` (manual sorting and paging: the page owns the data). */
  table: Table<T>;
  /** Read by screen readers only. */
  caption: string;
  isLoading?: boolean;
  /** A newer page is on its way; the current rows stay (keepPreviousData) and dim a little. */
  isFetching?: boolean;
  empty?: ReactNode;
  /** The last load failed: shown with Retry in place of the empty text (rows still held stay). */
  error?: unknown;
  onRetry?: () => void;
  rowClassName?: (row: Row<T>) => string | undefined;
  className?: string;
}

function ariaSort<T>(header: Header<T, unknown>): 'ascending' | 'descending' | 'none' | undefined {
  if (!header.column.getCanSort()) return undefined;
  const sorted = header.column.getIsSorted();
  if (sorted === 'asc') return 'ascending';
  if (sorted === 'desc') return 'descending';
  return 'none';
}

const SortIcon = ({ direction }: { direction: false | 'asc' | 'desc' }) => (
  <svg viewBox="0 0 12 12" className={cn('size-3 shrink-0', direction ? 'text-copper-strong' : 'text-ink-faint')} aria-hidden="true">
    <path d="M6 1.5 9 5H3z" fill="currentColor" opacity={direction === 'desc' ? 0.25 : 1} />
    <path d="M6 10.5 3 7h6z" fill="currentColor" opacity={direction === 'asc' ? 0.25 : 1} />
  </svg>
);

const HeaderCell = <T,>({ header }: { header: Header<T, unknown> }) => {
  const content = header.isPlaceholder ? null : flexRender(header.column.columnDef.header, header.getContext());
  const className = header.column.columnDef.meta?.className;
  const sortable = header.column.getCanSort();
  const direction = header.column.getIsSorted();
  return (
    <th
      scope="col"
      aria-sort={ariaSort(header)}
      className={cn(
        'sticky top-0 z-10 border-b border-line-strong bg-ground-deep px-3 py-2 text-left text-xs font-semibold tracking-wide text-ink-muted uppercase',
        className,
      )}
    >
      {sortable ? (
        <button
          type="button"
          onClick={header.column.getToggleSortingHandler()}
          className="-mx-1 inline-flex min-h-11 items-center gap-1 rounded-sm px-1 uppercase hover:text-ink md:min-h-6 pointer-coarse:min-h-11"
        >
          {content}
          <SortIcon direction={direction} />
          <span className="sr-only">{direction === 'asc' ? ', sorted ascending' : direction === 'desc' ? ', sorted descending' : ', sortable'}</span>
        </button>
      ) : (
        content
      )}
    </th>
  );
};

/** A column's name for a phone's card: its header when that is text, else `meta.label`. */
function cellLabel<T>(def: ColumnDef<T, unknown>): string | undefined {
  const label = def.meta?.label ?? (typeof def.header === 'string' ? def.header : undefined);
  return label || undefined;
}

/**
 * A server-sorted, paged list. Wide on a desk; below the `md` breakpoint each row is a card (the
 * `card-table` rules in styles.css) with every cell on its own line under its column's name, so
 * status and amount are never cut off the edge of a phone.
 */
export const DataTable = <T,>({
  table,
  caption,
  isLoading = false,
  isFetching = false,
  empty = 'Nothing to show.',
  error,
  onRetry,
  rowClassName,
  className,
}: DataTableProps<T>) => {
  const rows = table.getRowModel().rows;
  const columnCount = table.getVisibleLeafColumns().length;
  // Retrying after a failure shows the spinner, not the empty text.
  const failed = Boolean(error) && !isFetching;
  const loading = isLoading || (Boolean(error) && isFetching && rows.length === 0);
  return (
    <ScrollRegion
      label={caption}
      className={cn('relative md:max-h-[70dvh] md:overflow-auto md:rounded-md md:border md:border-line md:bg-surface', className)}
      aria-busy={isLoading || isFetching || undefined}
    >
      {failed && rows.length > 0 ? <LoadError error={error} onRetry={onRetry} className="m-2" /> : null}
      <table className="card-table w-full border-separate border-spacing-0 text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead>
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => (
                <HeaderCell key={header.id} header={header} />
              ))}
            </tr>
          ))}
        </thead>
        <tbody className={cn(isFetching && !loading && 'opacity-60 transition-opacity')}>
          {loading ? (
            <tr>
              <td colSpan={columnCount} className="px-3 py-8 text-center text-ink-muted">
                <span className="inline-flex items-center gap-2">
                  <Spinner className="size-4 text-copper" /> Loading…
                </span>
              </td>
            </tr>
          ) : rows.length === 0 && failed ? (
            <tr>
              <td colSpan={columnCount} className="p-2">
                <LoadError error={error} onRetry={onRetry} />
              </td>
            </tr>
          ) : rows.length === 0 ? (
            <tr>
              <td colSpan={columnCount} className="px-3 py-8 text-center text-ink-muted">
                {empty}
              </td>
            </tr>
          ) : (
            rows.map((row) => (
              <tr key={row.id} className={cn('group hover:bg-ground/70', rowClassName?.(row))}>
                {row.getVisibleCells().map((cell) => (
                  <td
                    key={cell.id}
                    data-label={cellLabel(cell.column.columnDef)}
                    className={cn('border-b border-line px-3 py-1.5 align-middle group-last:border-b-0', cell.column.columnDef.meta?.className)}
                  >
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))
          )}
        </tbody>
      </table>
    </ScrollRegion>
  );
};

export interface DataTablePaginationProps {
  page: number;
  pageSize: number;
  total: number;
  onPageChange: (page: number) => void;
  onPageSizeChange?: (pageSize: number) => void;
  pageSizeOptions?: readonly number[];
  /** Hold "Next" while the shown page is a placeholder for the one being fetched. */
  isPlaceholder?: boolean;
  /** What the rows are: one word, or [singular, plural]. */
  noun?: string | readonly [string, string];
  /** The list could not be loaded: no count is claimed. */
  failed?: boolean;
}

export const DataTablePagination = ({
  page,
  pageSize,
  total,
  onPageChange,
  onPageSizeChange,
  pageSizeOptions = [25, 50, 100],
  isPlaceholder = false,
  noun = 'rows',
  failed = false,
}: DataTablePaginationProps) => {
  const pageCount = Math.max(1, Math.ceil(total / pageSize));
  const [one, many] = typeof noun === 'string' ? [noun, noun] : noun;
  const first = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);
  return (
    <nav aria-label="Pages" className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-muted">
      <p aria-live="polite">
        {total === 0 ? (failed ? null : `No ${many}`) : `${first}–${last} of ${total} ${total === 1 ? one : many}`}
        {pageCount > 1 ? ` · page ${page} of ${pageCount}` : null}
      </p>
      <div className="flex items-center gap-2">
        {onPageSizeChange ? (
          <label className="flex items-center gap-2">
            <span>Per page</span>
            <Select value={pageSize} onChange={(event) => onPageSizeChange(Number(event.target.value))} className="w-20">
              {pageSizeOptions.map((size) => (
                <option key={size} value={size}>
                  {size}
                </option>
              ))}
            </Select>
          </label>
        ) : null}
        <Button variant="secondary" size="sm" onClick={() => onPageChange(page - 1)} disabled={page <= 1}>
          Previous
        </Button>
        <Button variant="secondary" size="sm" onClick={() => onPageChange(page + 1)} disabled={page >= pageCount || isPlaceholder}>
          Next
        </Button>
      </div>
    </nav>
  );
};
