import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Overpayment, OverpaymentRefundInput } from '../../../../shared/schemas/billing.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

export const getOpenOverpaymentsQueryOptions = () =>
  queryOptions({
    queryKey: billingKeys.openOverpayments(),
    queryFn: ({ signal }) => api.get<Page<Overpayment>>('/api/billing/overpayments', { query: { open: 'true' }, signal }),
  });

/** Online payments beyond what was due that are still owed back to members (the treasurer's). */
export const useOpenOverpayments = (enabled = true) => useQuery({ ...getOpenOverpaymentsQueryOptions(), enabled });

export const useMarkOverpaymentRefunded = () =>
  useApiMutation(
    ({ paymentId, ...input }: OverpaymentRefundInput & { paymentId: string }) =>
      api.post<{ overpayment: Overpayment }>(`/api/billing/overpayments/${paymentId}/refunded`, input),
    [billingKeys.all],
  );
