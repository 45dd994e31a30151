import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { ProductionRecords } from '../../../../shared/schemas/batches.ts';
import { api, buildUrl } from '@/lib/api-client';
import { batchKeys } from '@/features/batches/api/keys';

export const getProductionRecordsQueryOptions = (from: string, to: string) =>
  queryOptions({
    queryKey: batchKeys.productionRecords(from, to),
    queryFn: ({ signal }) => api.get<ProductionRecords>('/api/production-records', { query: { from, to }, signal }),
    placeholderData: keepPreviousData,
  });

export function useProductionRecords(from: string, to: string) {
  return useQuery(getProductionRecordsQueryOptions(from, to));
}

export const productionRecordsExportHref = (from: string, to: string, format: 'csv' | 'xlsx') =>
  buildUrl('/api/production-records/export', { from, to, format });
