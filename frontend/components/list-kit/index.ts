export {
  defineListQuery,
  applyListPatch,
  pagingQuerySchema,
  type ListPatch,
  type ListQueryDefinition,
  type ListState,
  type SetListQuery,
  type SetListQueryOptions,
} from './list-query';
export { useListQuery, useClampPage } from './use-list-query';
export { useDebouncedSearch, searchDelayMs } from './use-debounced-search';
export {
  FilterField,
  FilterGrid,
  FilterSelect,
  type FilterSelectProps,
  ListSearch,
  QueryFilter,
  type QueryFilterProps,
  SearchInput,
  filterLabelClass,
  filterLabelMutedClass,
} from './filters';
export { ListPager, ListTable, type ListProps, type ListResult, type ListTableProps } from './list-table';
export { pageQueryOptions } from './page-query';
export { useListTable, type ListColumns, type UseListTableOptions } from './use-list-table';
export { Dash, Time, dateCell, dateTimeCell, figureMeta, nowrapCell } from './cells';
export { EmptyRow, figureHead, hiddenHead, TableHead, type HeadCell, type LabelledHead, type TableHeadProps } from './table-head';
