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
import { useApiMutation } from '@/lib/api-mutation';

export { paymentInputSchema, refundInputSchema, voidInvoiceSchema };

/** After any change of money: the invoice itself straight from the answer, everything else refetched. */
const useInvoiceAction = <TData extends { invoice: InvoiceDetail }, TVariables = void>(mutationFn: (variables: TVariables) => Promise<TData>) =>
  useApiMutation(mutationFn, [billingKeys.all], ({ invoice }, queryClient) => queryClient.setQueryData(billingKeys.invoice(invoice.id), invoice));

export const useIssueInvoice = (id: string) => useInvoiceAction(() => api.post<{ invoice: InvoiceDetail }>(`/api/invoices/${id}/issue`));

export const useSendInvoice = (id: string) =>
  useInvoiceAction(() => api.post<{ queued: boolean; to: string; invoice: InvoiceDetail }>(`/api/invoices/${id}/send`));

export const useRecordPayment = (id: string) =>
  useInvoiceAction((input: PaymentInput) => api.post<{ payment: Payment; invoice: InvoiceDetail }>(`/api/invoices/${id}/payments`, input));

export const useVoidInvoice = (id: string) =>
  useInvoiceAction((input: VoidInvoiceInput) => api.post<{ creditNoteId: string | null; invoice: InvoiceDetail }>(`/api/invoices/${id}/void`, input));

export const useRefundInvoice = (id: string) =>
  useInvoiceAction((input: RefundInput) => api.post<{ creditNoteId: string; invoice: InvoiceDetail }>(`/api/invoices/${id}/refunds`, input));

/** Opens the payment provider's page for what is due; the browser goes there. */
export const useStartCheckout = (id: string) =>
  useApiMutation(
    () => api.post<{ url: string; sessionId: string }>(`/api/invoices/${id}/checkout`),
    [],
    ({ url }) => window.location.assign(url),
  );

/** Back from the provider: ask it directly, in case its notice to us is still on its way. */
export const useConfirmCheckout = (id: string) =>
  useInvoiceAction((sessionId: string) => api.post<{ outcome: string; invoice: InvoiceDetail }>(`/api/invoices/${id}/checkout/confirm`, { sessionId }));
