import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateReadingInput, ReadingDto } from '../../../../shared/schemas/batches.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';
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
function useInvalidateBatch(batchId: string) {
  const queryClient = useQueryClient();
  return () => {
    void queryClient.invalidateQueries({ queryKey: batchKeys.detail(batchId) });
    void queryClient.invalidateQueries({ queryKey: batchKeys.lists() });
  };
}

export function useCreateReading(batchId: string) {
  const invalidate = useInvalidateBatch(batchId);
  return useMutation({
    mutationFn: (input: CreateReadingInput) =>
      api.post<{ reading: ReadingDto }>(`/api/batches/${encodeURIComponent(batchId)}/readings`, input).then((r) => r.reading),
    onSuccess: invalidate,
  });
}

export function useDeleteReading(batchId: string) {
  const invalidate = useInvalidateBatch(batchId);
  return useMutation({
    mutationFn: (readingId: string) => api.delete<void>(`/api/batches/${encodeURIComponent(batchId)}/readings/${encodeURIComponent(readingId)}`),
    onSuccess: invalidate,
  });
}
