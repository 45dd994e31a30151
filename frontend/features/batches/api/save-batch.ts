import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { BatchDetail, CreateBatchInput, UpdateBatchInput } from '../../../../shared/schemas/batches.ts';
import { api } from '@/lib/api-client';
import { batchKeys } from '@/features/batches/api/keys';

export const createBatch = (input: CreateBatchInput) => api.post<{ batch: BatchDetail }>('/api/batches', input).then((r) => r.batch);
export const updateBatch = (id: string, input: UpdateBatchInput) =>
  api.patch<{ batch: BatchDetail }>(`/api/batches/${encodeURIComponent(id)}`, input).then((r) => r.batch);

export function useCreateBatch() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createBatch,
    onSuccess: (batch) => {
      queryClient.setQueryData(batchKeys.detail(batch.id), batch);
      void queryClient.invalidateQueries({ queryKey: batchKeys.lists() });
    },
  });
}

export function useUpdateBatch(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateBatchInput) => updateBatch(id, input),
    onSuccess: (batch) => {
      queryClient.setQueryData(batchKeys.detail(batch.id), batch);
      void queryClient.invalidateQueries({ queryKey: batchKeys.lists() });
    },
  });
}
