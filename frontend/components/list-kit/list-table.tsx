import type { Page } from '../../../shared/schemas/pagination.ts';
import type { ListPatch, ListState, SetListQueryOptions } from '@/components/list-kit/list-query';
import { useListTable, type UseListTableOptions } from '@/components/list-kit/use-list-table';
import { DataTable, DataTablePagination, type DataTableProps } from '@/components/ui/data-table';

/** What a list screen needs of its query's result (TanStack Query's `useQuery` gives it). */
export interface ListResult<T> {
  data?: Page<T> | undefined;
  isPending: boolean;
  error: unknown;
  isFetching: boolean;
  isPlaceholderData: boolean;
  refetch: () => unknown;
}

/** The props every list component takes from its screen: the URL's state, the result, and a way to change the state. */
export interface ListProps<T, Q extends ListState> {
  query: Q;
  list: ListResult<T>;
  onQueryChange: (patch: ListPatch<Q>, options?: SetListQueryOptions) => void;
}

export interface ListPagerProps {
  list: Pick<ListResult<unknown>, 'data' | 'error' | 'isPlaceholderData'>;
  query: Pick<ListState, 'page' | 'pageSize'>;
  onQueryChange: (patch: { page?: number; pageSize?: number }) => void;
  /** What the rows are: one word, or [singular, plural]. */
  noun: string | readonly [string, string];
  /** The page sizes to offer; `false` for none (the page size is the screen's). */
  pageSizes?: readonly number[] | false;
}

/** The counts and Previous / Next under a list, bound to the list's state. */
export const ListPager = ({ list, query, onQueryChange, noun, pageSizes = [25, 50, 100] }: ListPagerProps) => (
  <DataTablePagination
    failed={Boolean(list.error)}
    page={query.page}
    pageSize={query.pageSize}
    total={list.data?.total ?? 0}
    isPlaceholder={list.isPlaceholderData}
    onPageChange={(page) => onQueryChange({ page })}
    {...(pageSizes ? { onPageSizeChange: (pageSize: number) => onQueryChange({ pageSize }), pageSizeOptions: pageSizes } : {})}
    noun={noun}
  />
);

export type ListTableProps<T, Q extends ListState> = Omit<DataTableProps<T>, 'table' | 'isLoading' | 'isFetching' | 'error' | 'onRetry'> &
  Omit<UseListTableOptions<T, Q>, 'data'> &
  Omit<ListPagerProps, 'list' | 'query' | 'onQueryChange'> & { list: ListResult<T> };

/**
 * A server-sorted, paged table with its pager, from TanStack column definitions: loading, failure
 * with Retry, empty text and counts in one place.
 */
export const ListTable = <T, Q extends ListState>({
  list,
  query,
  onQueryChange,
  columns,
  sortFields,
  getRowId,
  tableOptions,
  noun,
  pageSizes,
  ...shown
}: ListTableProps<T, Q>) => {
  const table = useListTable({ data: list.data, columns, query, onQueryChange, sortFields, getRowId, tableOptions });
  return (
    <div className="flex flex-col gap-3">
      <DataTable {...shown} table={table} isLoading={list.isPending} error={list.error} onRetry={() => void list.refetch()} isFetching={list.isFetching} />
      <ListPager list={list} query={query} onQueryChange={(patch) => onQueryChange(patch as ListPatch<Q>)} noun={noun} pageSizes={pageSizes} />
    </div>
  );
};
