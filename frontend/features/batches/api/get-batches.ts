import { useQuery } from '@tanstack/react-query';
import { batchListQuerySchema, type BatchListItem, type BatchListQuery } from '../../../../shared/schemas/batches.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { batchKeys } from '@/features/batches/api/keys';

/** The batches list's state in the URL: newest first unless sorted otherwise. */
export const batchListQuery = defineListQuery(batchListQuerySchema, { order: 'desc' });

export const getBatchesQueryOptions = (query: BatchListQuery) =>
  pageQueryOptions<BatchListItem>(batchKeys.list(query), '/api/batches', { ...query, mine: query.mine ? 1 : undefined });

export function useBatches(query: BatchListQuery) {
  return useQuery(getBatchesQueryOptions(query));
}
