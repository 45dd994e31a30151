import { useCallback, useEffect, useMemo } from 'react';
import type { Page } from '../../../shared/schemas/pagination.ts';
import { applyListPatch, type ListPatch, type ListQueryDefinition, type ListState, type SetListQueryOptions } from '@/components/list-kit/list-query';
import { useSearchParamsState } from '@/hooks/use-search-params-state';

/**
 * A list's state in the URL: Back and Forward step through its changes and a reload keeps it.
 * Each change is a history entry unless `replace` is set, as the search box does while you type.
 */
export function useListQuery<Q extends ListState>(definition: ListQueryDefinition<Q>) {
  // Updates start from the URL as it is now, so two quick filter changes never undo each other.
  const [searchParams, updateSearchParams] = useSearchParamsState();
  const query = useMemo(() => definition.parse(searchParams), [definition, searchParams]);
  const setQuery = useCallback(
    (patch: ListPatch<Q>, options: SetListQueryOptions = {}) =>
      updateSearchParams((previous) => definition.toParams(applyListPatch(definition, definition.parse(previous), patch)), {
        replace: options.replace ?? false,
      }),
    [definition, updateSearchParams],
  );
  const filters = definition.activeFilters(query);
  /** Every filter back to its default (paging and sorting stay as they are, but for the page). */
  const clearFilters = useCallback(
    () =>
      setQuery(
        Object.fromEntries(
          definition.activeFilters(definition.parse(new URLSearchParams(window.location.search))).map((key) => [key, undefined]),
        ) as ListPatch<Q>,
      ),
    [definition, setQuery],
  );
  return { query, setQuery, defaults: definition.defaults, hasFilters: filters.length > 0, clearFilters };
}

/** Past the last page (after filtering, or after rows went away): go to the last page there is. */
export function useClampPage<Q extends ListState>(
  list: { data?: Page<unknown> | undefined; isPlaceholderData: boolean },
  query: Q,
  setQuery: (patch: ListPatch<Q>, options?: SetListQueryOptions) => void,
) {
  const total = list.data?.total ?? 0;
  const count = list.data?.items.length ?? 0;
  const loaded = !list.isPlaceholderData && Boolean(list.data);
  useEffect(() => {
    if (!loaded || count > 0 || query.page <= 1) return;
    const last = Math.max(1, Math.ceil(total / query.pageSize));
    if (last !== query.page) setQuery({ page: last } as ListPatch<Q>, { replace: true });
  }, [loaded, count, total, query.page, query.pageSize, setQuery]);
}
