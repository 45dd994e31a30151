import { useQuery } from '@tanstack/react-query';
import { invoiceListQuerySchema, type InvoiceListQuery, type InvoiceSummary } from '../../../../shared/schemas/billing.ts';
import { defineListQuery, pageQueryOptions } from '@/components/list-kit';
import { billingKeys } from '@/features/billing/api/keys';

/** The invoice lists' state in the URL: newest first unless sorted otherwise. */
export const invoiceListQuery = defineListQuery(invoiceListQuerySchema, { sort: 'createdAt', order: 'desc' });

export const getInvoicesQueryOptions = (query: InvoiceListQuery) => pageQueryOptions<InvoiceSummary>(billingKeys.invoiceList(query), '/api/invoices', query);

export function useInvoices(query: InvoiceListQuery) {
  return useQuery(getInvoicesQueryOptions(query));
}
