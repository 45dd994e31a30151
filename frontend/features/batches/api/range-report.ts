import { keepPreviousData, queryOptions, type QueryKey } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

/** A report over a range of days: the last figures stay on screen while the next range loads. */
export const rangeReportQueryOptions = <T>(queryKey: QueryKey, path: string, from: string, to: string) =>
  queryOptions({
    queryKey,
    queryFn: ({ signal }) => api.get<T>(path, { query: { from, to }, signal }),
    placeholderData: keepPreviousData,
  });
