import type { QueryClient } from '@tanstack/react-query';
import type { BatchDetail, CreateBatchInput, UpdateBatchInput } from '../../../../shared/schemas/batches.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { batchKeys } from '@/features/batches/api/keys';

export const createBatch = (input: CreateBatchInput) => api.post<{ batch: BatchDetail }>('/api/batches', input).then((r) => r.batch);
export const updateBatch = (id: string, input: UpdateBatchInput) =>
  api.patch<{ batch: BatchDetail }>(`/api/batches/${encodeURIComponent(id)}`, input).then((r) => r.batch);

/** The saved batch goes straight into its page's cache; the lists refetch in the background. */
const showSaved = (batch: BatchDetail, queryClient: QueryClient) => {
  queryClient.setQueryData(batchKeys.detail(batch.id), batch);
  void queryClient.invalidateQueries({ queryKey: batchKeys.lists() });
};

export const useCreateBatch = () => useApiMutation(createBatch, [], showSaved);

export const useUpdateBatch = (id: string) => useApiMutation((input: UpdateBatchInput) => updateBatch(id, input), [], showSaved);
