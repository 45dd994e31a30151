import { useMutation, useQueryClient } from '@tanstack/react-query';
import {
  paymentInputSchema,
  refundInputSchema,
  voidInvoiceSchema,
  type InvoiceDetail,
  type Payment,
  type PaymentInput,
  type RefundInput,
  type VoidInvoiceInput,
} from '../../../../shared/schemas/billing.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export { paymentInputSchema, refundInputSchema, voidInvoiceSchema };

/** After any change of money: the invoice itself straight from the answer, everything else refetched. */
function useSettle() {
  const queryClient = useQueryClient();
  return (invoice: InvoiceDetail) => {
    queryClient.setQueryData(billingKeys.invoice(invoice.id), invoice);
    return queryClient.invalidateQueries({ queryKey: billingKeys.all });
  };
}

export function useIssueInvoice(id: string) {
  const settle = useSettle();
  return useMutation({
    mutationFn: () => api.post<{ invoice: InvoiceDetail }>(`/api/invoices/${id}/issue`),
    onSuccess: ({ invoice }) => settle(invoice),
  });
}

export function useSendInvoice(id: string) {
  const settle = useSettle();
  return useMutation({
    mutationFn: () => api.post<{ queued: boolean; to: string; invoice: InvoiceDetail }>(`/api/invoices/${id}/send`),
    onSuccess: ({ invoice }) => settle(invoice),
  });
}

export function useRecordPayment(id: string) {
  const settle = useSettle();
  return useMutation({
    mutationFn: (input: PaymentInput) => api.post<{ payment: Payment; invoice: InvoiceDetail }>(`/api/invoices/${id}/payments`, input),
    onSuccess: ({ invoice }) => settle(invoice),
  });
}

export function useVoidInvoice(id: string) {
  const settle = useSettle();
  return useMutation({
    mutationFn: (input: VoidInvoiceInput) => api.post<{ creditNoteId: string | null; invoice: InvoiceDetail }>(`/api/invoices/${id}/void`, input),
    onSuccess: ({ invoice }) => settle(invoice),
  });
}

export function useRefundInvoice(id: string) {
  const settle = useSettle();
  return useMutation({
    mutationFn: (input: RefundInput) => api.post<{ creditNoteId: string; invoice: InvoiceDetail }>(`/api/invoices/${id}/refunds`, input),
    onSuccess: ({ invoice }) => settle(invoice),
  });
}

/** Opens the payment provider's page for what is due; the browser goes there. */
export function useStartCheckout(id: string) {
  return useMutation({
    mutationFn: () => api.post<{ url: string; sessionId: string }>(`/api/invoices/${id}/checkout`),
    onSuccess: ({ url }) => window.location.assign(url),
  });
}

/** Back from the provider: ask it directly, in case its notice to us is still on its way. */
export function useConfirmCheckout(id: string) {
  const settle = useSettle();
  return useMutation({
    mutationFn: (sessionId: string) => api.post<{ outcome: string; invoice: InvoiceDetail }>(`/api/invoices/${id}/checkout/confirm`, { sessionId }),
    onSuccess: ({ invoice }) => settle(invoice),
  });
}
