import { queryOptions, useQuery } from '@tanstack/react-query';
import type { InvoiceDetail } from '../../../../shared/schemas/billing.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export const getInvoice = (id: string, signal?: AbortSignal) =>
  api.get<{ invoice: InvoiceDetail }>(`/api/invoices/${encodeURIComponent(id)}`, signal ? { signal } : {}).then((r) => r.invoice);

export const getInvoiceQueryOptions = (id: string) =>
  queryOptions({ queryKey: billingKeys.invoice(id), queryFn: ({ signal }) => getInvoice(id, signal) });

export function useInvoice(id: string, options: { refetchInterval?: number | false } = {}) {
  return useQuery({ ...getInvoiceQueryOptions(id), refetchInterval: options.refetchInterval ?? false });
}

export const invoicePdfUrl = (id: string) => `/api/invoices/${encodeURIComponent(id)}/pdf`;
