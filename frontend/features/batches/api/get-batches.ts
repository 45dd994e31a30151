import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { BatchListItem, BatchListQuery } from '../../../../shared/schemas/batches.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';

export const batchKeys = {
  all: ['batches'] as const,
  list: (query: BatchListQuery) => [...batchKeys.all, 'list', query] as const,
  detail: (id: string) => [...batchKeys.all, 'detail', id] as const,
  readings: (id: string, query: object) => [...batchKeys.all, 'detail', id, 'readings', query] as const,
};

export const getBatches = (query: BatchListQuery, signal?: AbortSignal) =>
  api.get<Page<BatchListItem>>('/api/batches', { query: { ...query, mine: query.mine ? 1 : undefined }, ...(signal ? { signal } : {}) });

export const getBatchesQueryOptions = (query: BatchListQuery) =>
  queryOptions({
    queryKey: batchKeys.list(query),
    queryFn: ({ signal }) => getBatches(query, signal),
    placeholderData: keepPreviousData,
  });

export function useBatches(query: BatchListQuery) {
  return useQuery(getBatchesQueryOptions(query));
}
