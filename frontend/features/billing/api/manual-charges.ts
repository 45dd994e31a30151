import { useQuery } from '@tanstack/react-query';
import { manualChargeInputSchema, type ManualCharge, type ManualChargeInput } from '../../../../shared/schemas/billing.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import type { User } from '../../../../shared/schemas/user.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { userKeys } from '@/features/users/api/keys';

export { manualChargeInputSchema };

export function useManualCharges(period?: string) {
  return useQuery({
    queryKey: billingKeys.manualCharges(period),
    queryFn: ({ signal }) => api.get<Page<ManualCharge>>('/api/manual-charges', { query: { period }, signal }),
  });
}

export const useAddManualCharge = () =>
  useApiMutation((input: ManualChargeInput) => api.post<{ charge: ManualCharge }>('/api/manual-charges', input), [billingKeys.all]);

export const useRemoveManualCharge = () => useApiMutation((id: string) => api.delete<void>(`/api/manual-charges/${id}`), [billingKeys.all]);

/** The members a treasurer bills, for pickers (everyone holding the member role). */
export function useBillableMembers() {
  return useQuery({
    queryKey: userKeys.billableMembers(),
    queryFn: ({ signal }) =>
      api.get<Page<User>>('/api/users', { query: { role: 'member', pageSize: 100, sort: 'name', order: 'asc' }, signal }).then((p) => p.items),
    staleTime: 5 * 60_000,
  });
}
