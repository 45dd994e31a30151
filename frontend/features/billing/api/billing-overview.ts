import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AgeingReport, BillingSummary, InvoiceRun, MemberBalance } from '../../../../shared/schemas/billing.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export const getSummaryQueryOptions = () =>
  queryOptions({ queryKey: billingKeys.summary(), queryFn: ({ signal }) => api.get<BillingSummary>('/api/billing/summary', { signal }) });

export const useBillingSummary = () => useQuery(getSummaryQueryOptions());

export const getAgeingQueryOptions = (asOf?: string) =>
  queryOptions({
    queryKey: billingKeys.ageing(asOf),
    queryFn: ({ signal }) => api.get<AgeingReport>('/api/billing/ageing', { query: { asOf }, signal }),
  });

export const useAgeing = (asOf?: string) => useQuery(getAgeingQueryOptions(asOf));

export const getRunsQueryOptions = () =>
  queryOptions({ queryKey: billingKeys.runs(), queryFn: ({ signal }) => api.get<Page<InvoiceRun>>('/api/invoice-runs', { signal }) });

export const useRuns = () => useQuery(getRunsQueryOptions());

export const getBalanceQueryOptions = () =>
  queryOptions({ queryKey: billingKeys.balance(), queryFn: ({ signal }) => api.get<MemberBalance>('/api/billing/balance', { signal }) });

export const useMyBalance = () => useQuery(getBalanceQueryOptions());
