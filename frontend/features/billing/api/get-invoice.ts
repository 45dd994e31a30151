import { queryOptions, useQuery } from '@tanstack/react-query';
import type { InvoiceDetail } from '../../../../shared/schemas/billing.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export const getInvoice = (id: string, signal?: AbortSignal) =>
  api.get<{ invoice: InvoiceDetail }>(`/api/invoices/${encodeURIComponent(id)}`, signal ? { signal } : {}).then((r) => r.invoice);

export const getInvoiceQueryOptions = (id: string) => queryOptions({ queryKey: billingKeys.invoice(id), queryFn: ({ signal }) => getInvoice(id, signal) });

/** `refetchInterval` may look at the invoice last fetched (to stop asking once it shows what is awaited). */
export function useInvoice(id: string, options: { refetchInterval?: number | false | ((invoice: InvoiceDetail | undefined) => number | false) } = {}) {
  const { refetchInterval = false } = options;
  return useQuery({
    ...getInvoiceQueryOptions(id),
    refetchInterval: typeof refetchInterval === 'function' ? (query) => refetchInterval(query.state.data) : refetchInterval,
  });
}

export const invoicePdfUrl = (id: string) => `/api/invoices/${encodeURIComponent(id)}/pdf`;
