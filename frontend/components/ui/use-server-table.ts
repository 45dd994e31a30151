import { getCoreRowModel, useReactTable, type ColumnDef, type SortingState, type TableOptions, type Updater } from '@tanstack/react-table';
import type { Page } from '../../../shared/schemas/pagination.ts';

export interface ServerTableQuery<S extends string> {
  page: number;
  pageSize: number;
  sort: S;
  order: 'asc' | 'desc';
}

export interface UseServerTableOptions<T, S extends string> {
  data: Page<T> | undefined;
  // Column value types differ per column; TanStack's own helpers produce this shape.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- as above
  columns: ColumnDef<T, any>[];
  query: ServerTableQuery<S>;
  onQueryChange: (patch: { sort: S; order: 'asc' | 'desc' }) => void;
  /** The columns the server sorts by (its list schema's allowlist); other headers do not sort. */
  sortFields: readonly S[];
  getRowId: (row: T) => string;
  /** Extra TanStack options (row selection and the like). */
  extra?: Partial<TableOptions<T>>;
}

/**
 * A TanStack table whose sorting and paging happen on the server: the URL's query is the state, a
 * header click becomes a new `sort`/`order` for the query (only for the server's sortable columns).
 */
export function useServerTable<T, S extends string>({ data, columns, query, onQueryChange, sortFields, getRowId, extra = {} }: UseServerTableOptions<T, S>) {
  const isSortField = (id: string): id is S => (sortFields as readonly string[]).includes(id);
  const sorting: SortingState = [{ id: query.sort, desc: query.order === 'desc' }];
  const onSortingChange = (updater: Updater<SortingState>) => {
    const next = typeof updater === 'function' ? updater(sorting) : updater;
    const first = next[0];
    if (!first || !isSortField(first.id)) return;
    onQueryChange({ sort: first.id, order: first.desc ? 'desc' : 'asc' });
  };
  return useReactTable<T>({
    data: data?.items ?? [],
    columns,
    getRowId,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    rowCount: data?.total ?? 0,
    onSortingChange,
    ...extra,
    state: { sorting, pagination: { pageIndex: query.page - 1, pageSize: query.pageSize }, ...extra.state },
  });
}
