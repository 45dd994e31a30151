import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  billingProfileSchema,
  priceInputSchema,
  taxRateInputSchema,
  type BillingProfile,
  type Price,
  type PriceInput,
  type TaxRate,
  type TaxRateInput,
} from '../../../../shared/schemas/billing.ts';
import { billingKeys } from '@/features/billing/api/keys';
import { api } from '@/lib/api-client';

export { billingProfileSchema, priceInputSchema, taxRateInputSchema };

export interface PriceListResponse {
  items: Price[];
  taxRates: TaxRate[];
  currency: string;
  today: string;
}

export const getPricesQueryOptions = () =>
  queryOptions({ queryKey: billingKeys.prices(), queryFn: ({ signal }) => api.get<PriceListResponse>('/api/prices', { signal }) });

export const usePrices = () => useQuery(getPricesQueryOptions());

export function useAddPrice() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: PriceInput) => api.post<{ price: Price }>('/api/prices', input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}

export function useWithdrawPrice() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete<void>(`/api/prices/${id}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}

export function useAddTaxRate() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: TaxRateInput) => api.post<{ taxRate: TaxRate }>('/api/tax-rates', input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}

export function useWithdrawTaxRate() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete<void>(`/api/tax-rates/${id}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}

export const getProfileQueryOptions = () =>
  queryOptions({
    queryKey: billingKeys.profile(),
    queryFn: ({ signal }) => api.get<{ profile: BillingProfile }>('/api/billing/profile', { signal }).then((r) => r.profile),
  });

export const useBillingProfile = () => useQuery(getProfileQueryOptions());

export function useSaveBillingProfile() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (profile: BillingProfile) => api.put<{ profile: BillingProfile }>('/api/billing/profile', profile),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: billingKeys.all }),
  });
}
