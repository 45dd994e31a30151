import { keepPreviousData, queryOptions, useQuery, type QueryClient } from '@tanstack/react-query';
import type { CreateReadingInput, ReadingDto } from '../../../../shared/schemas/batches.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { batchKeys } from '@/features/batches/api/keys';

export interface ReadingsQuery {
  page: number;
  pageSize: number;
  sort: 'takenAt' | 'gravitySg' | 'temperatureC' | 'createdAt';
  order: 'asc' | 'desc';
}

export const getReadingsQueryOptions = (batchId: string, query: ReadingsQuery) =>
  queryOptions({
    queryKey: batchKeys.readings(batchId, query),
    queryFn: ({ signal }) => api.get<Page<ReadingDto>>(`/api/batches/${encodeURIComponent(batchId)}/readings`, { query: { ...query }, signal }),
    placeholderData: keepPreviousData,
  });

export function useReadings(batchId: string, query: ReadingsQuery) {
  return useQuery(getReadingsQueryOptions(batchId, query));
}

/** After a reading changes, the batch's figures and its list row change too. */
/** The batch's page and the lists refetch in the background. */
const refreshBatch = (batchId: string) => (_: unknown, queryClient: QueryClient) => {
  void queryClient.invalidateQueries({ queryKey: batchKeys.detail(batchId) });
  void queryClient.invalidateQueries({ queryKey: batchKeys.lists() });
};

export const useCreateReading = (batchId: string) =>
  useApiMutation(
    (input: CreateReadingInput) => api.post<{ reading: ReadingDto }>(`/api/batches/${encodeURIComponent(batchId)}/readings`, input).then((r) => r.reading),
    [],
    refreshBatch(batchId),
  );

export const useDeleteReading = (batchId: string) =>
  useApiMutation(
    (readingId: string) => api.delete<void>(`/api/batches/${encodeURIComponent(batchId)}/readings/${encodeURIComponent(readingId)}`),
    [],
    refreshBatch(batchId),
  );
