import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { InvoiceListQuery, InvoiceSummary } from '../../../../shared/schemas/billing.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export const getInvoices = (query: InvoiceListQuery, signal?: AbortSignal) =>
  api.get<Page<InvoiceSummary>>('/api/invoices', { query: { ...query }, ...(signal ? { signal } : {}) });

export const getInvoicesQueryOptions = (query: InvoiceListQuery) =>
  queryOptions({
    queryKey: billingKeys.invoiceList(query),
    queryFn: ({ signal }) => getInvoices(query, signal),
    placeholderData: keepPreviousData,
  });

export function useInvoices(query: InvoiceListQuery) {
  return useQuery(getInvoicesQueryOptions(query));
}
