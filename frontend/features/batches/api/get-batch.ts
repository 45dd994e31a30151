import { queryOptions, useQuery } from '@tanstack/react-query';
import type { BatchDetail } from '../../../../shared/schemas/batches.ts';
import { api } from '@/lib/api-client';
import { batchKeys } from '@/features/batches/api/keys';

export const getBatch = (id: string, signal?: AbortSignal) =>
  api.get<BatchDetail & { batch: BatchDetail }>(`/api/batches/${encodeURIComponent(id)}`, signal ? { signal } : {}).then((r) => r.batch);

export const getBatchQueryOptions = (id: string) => queryOptions({ queryKey: batchKeys.detail(id), queryFn: ({ signal }) => getBatch(id, signal) });

export function useBatch(id: string) {
  return useQuery(getBatchQueryOptions(id));
}
