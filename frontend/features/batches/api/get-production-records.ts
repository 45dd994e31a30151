import { useQuery } from '@tanstack/react-query';
import type { ProductionRecords } from '../../../../shared/schemas/batches.ts';
import { buildUrl } from '@/lib/api-client';
import { batchKeys } from '@/features/batches/api/keys';
import { rangeReportQueryOptions } from '@/features/batches/api/range-report';

export const getProductionRecordsQueryOptions = (from: string, to: string) =>
  rangeReportQueryOptions<ProductionRecords>(batchKeys.productionRecords(from, to), '/api/production-records', from, to);

export function useProductionRecords(from: string, to: string) {
  return useQuery(getProductionRecordsQueryOptions(from, to));
}

export const productionRecordsExportHref = (from: string, to: string, format: 'csv' | 'xlsx') =>
  buildUrl('/api/production-records/export', { from, to, format });
