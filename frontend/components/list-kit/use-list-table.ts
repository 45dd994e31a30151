import { getCoreRowModel, useReactTable, type ColumnDef, type SortingState, type TableOptions, type Updater } from '@tanstack/react-table';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { ListPatch, ListState } from '@/components/list-kit/list-query';

// Column value types differ per column; TanStack's own helpers produce this shape.
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- as above
export type ListColumns<T> = ColumnDef<T, any>[];

export interface UseListTableOptions<T, Q extends ListState> {
  data: Page<T> | undefined;
  columns: ListColumns<T>;
  query: Q;
  onQueryChange: (patch: ListPatch<Q>) => void;
  /** The columns the server sorts by (its list schema's allowlist); other headers do not sort. None: the list does not sort. */
  sortFields?: readonly string[];
  /** The row's id; `row.id` when left out. */
  getRowId?: (row: T) => string;
  /** Extra TanStack options (row selection and the like). */
  tableOptions?: Partial<TableOptions<T>>;
}

const idOf = (row: unknown) => (row as { id: string }).id;

/**
 * A TanStack table whose sorting and paging happen on the server: the URL's query is the state, a
 * header click becomes a new `sort`/`order` for the query (only for the server's sortable columns).
 */
export function useListTable<T, Q extends ListState>({
  data,
  columns,
  query,
  onQueryChange,
  sortFields,
  getRowId = idOf,
  tableOptions = {},
}: UseListTableOptions<T, Q>) {
  const sorting: SortingState = sortFields && query.sort ? [{ id: query.sort, desc: query.order === 'desc' }] : [];
  const onSortingChange = (updater: Updater<SortingState>) => {
    const next = typeof updater === 'function' ? updater(sorting) : updater;
    const first = next[0];
    if (!first || !sortFields?.includes(first.id)) return;
    onQueryChange({ sort: first.id, order: first.desc ? 'desc' : 'asc' } as ListPatch<Q>);
  };
  return useReactTable<T>({
    data: data?.items ?? [],
    columns,
    getRowId,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableSorting: Boolean(sortFields),
    enableMultiSort: false,
    enableSortingRemoval: false,
    rowCount: data?.total ?? 0,
    onSortingChange,
    ...tableOptions,
    state: { sorting, pagination: { pageIndex: query.page - 1, pageSize: query.pageSize }, ...tableOptions.state },
  });
}
