import { useQuery } from '@tanstack/react-query';
import { invoiceRunInputSchema, type InvoiceRun, type InvoiceRunInput, type InvoiceSummary, type RunPreview } from '../../../../shared/schemas/billing.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export { invoiceRunInputSchema };

export function useRunPreview(period: string | null) {
  return useQuery({
    queryKey: billingKeys.preview(period ?? ''),
    queryFn: ({ signal }) => api.get<RunPreview>('/api/invoice-runs/preview', { query: { period }, signal }),
    enabled: Boolean(period),
  });
}

export const useRunPeriod = () =>
  useApiMutation((input: InvoiceRunInput) => api.post<{ run: InvoiceRun; invoices: InvoiceSummary[] }>('/api/invoice-runs', input), [billingKeys.all]);

export const useIssueRunDrafts = () => useApiMutation((runId: string) => api.post<{ issued: number }>(`/api/invoice-runs/${runId}/issue`), [billingKeys.all]);

export const useSendRun = () => useApiMutation((runId: string) => api.post<{ queued: number }>(`/api/invoice-runs/${runId}/send`), [billingKeys.all]);
