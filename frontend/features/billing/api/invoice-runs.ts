import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { invoiceRunInputSchema, type InvoiceRun, type InvoiceRunInput, type InvoiceSummary, type RunPreview } from '../../../../shared/schemas/billing.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export { invoiceRunInputSchema };

export function useRunPreview(period: string | null) {
  return useQuery({
    queryKey: billingKeys.preview(period ?? ''),
    queryFn: ({ signal }) => api.get<RunPreview>('/api/invoice-runs/preview', { query: { period }, signal }),
    enabled: Boolean(period),
  });
}

export function useRunPeriod() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: InvoiceRunInput) => api.post<{ run: InvoiceRun; invoices: InvoiceSummary[] }>('/api/invoice-runs', input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}

export function useIssueRunDrafts() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => api.post<{ issued: number }>(`/api/invoice-runs/${runId}/issue`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}

export function useSendRun() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => api.post<{ queued: number }>(`/api/invoice-runs/${runId}/send`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}
