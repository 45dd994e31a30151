import { queryOptions, useQuery } from '@tanstack/react-query';
import type { BatchTrace, TraceReport } from '../../../../shared/schemas/trace.ts';
import { api, buildUrl } from '@/lib/api-client';
import { batchKeys } from '@/features/batches/api/keys';
import { rangeReportQueryOptions } from '@/features/batches/api/range-report';

export const getBatchTraceQueryOptions = (id: string) =>
  queryOptions({
    queryKey: batchKeys.trace(id),
    queryFn: ({ signal }) => api.get<BatchTrace>(`/api/batches/${encodeURIComponent(id)}/trace`, { signal }),
  });

/** Every keg the batch went into and where each is now. */
export function useBatchTrace(id: string) {
  return useQuery(getBatchTraceQueryOptions(id));
}

export const batchTraceHref = (id: string, format: 'csv' | 'pdf') => `/api/batches/${encodeURIComponent(id)}/trace.${format}`;

export const getTraceReportQueryOptions = (from: string, to: string) =>
  rangeReportQueryOptions<TraceReport>(batchKeys.traceReport(from, to), '/api/reports/trace', from, to);

/** Every keg filled in a date range, by batch, and where each is now. */
export function useTraceReport(from: string, to: string) {
  return useQuery(getTraceReportQueryOptions(from, to));
}

export const traceReportHref = (from: string, to: string, format: 'csv' | 'pdf') => buildUrl('/api/reports/trace', { from, to, format });
