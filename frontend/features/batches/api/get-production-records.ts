import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { ProductionRecords } from '../../../../shared/schemas/batches.ts';
import { api, buildUrl } from '@/lib/api-client';

export const getProductionRecordsQueryOptions = (from: string, to: string) =>
  queryOptions({
    queryKey: ['production-records', { from, to }],
    queryFn: ({ signal }) => api.get<ProductionRecords>('/api/production-records', { query: { from, to }, signal }),
    placeholderData: keepPreviousData,
  });

export function useProductionRecords(from: string, to: string) {
  return useQuery(getProductionRecordsQueryOptions(from, to));
}

export const productionRecordsExportHref = (from: string, to: string, format: 'csv' | 'xlsx') =>
  buildUrl('/api/production-records/export', { from, to, format });
