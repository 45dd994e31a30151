import { keepPreviousData, queryOptions, type QueryKey } from '@tanstack/react-query';
import type { Page } from '../../../shared/schemas/pagination.ts';
import { api, type QueryParams } from '@/lib/api-client';

/**
 * The query for one page of a list endpoint: `query` goes to the server as it is (paging, sort,
 * filters), and the page shown stays until the next one is in (no flash of "Loading…" on paging).
 */
export const pageQueryOptions = <T, K extends QueryKey = QueryKey>(queryKey: K, path: string, query: object) =>
  queryOptions({
    queryKey,
    queryFn: ({ signal }) => api.get<Page<T>>(path, { query: { ...(query as QueryParams) }, signal }),
    placeholderData: keepPreviousData,
  });
