import { queryOptions, useQuery } from '@tanstack/react-query';
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
import { useApiMutation } from '@/lib/api-mutation';

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

export const useAddPrice = () => useApiMutation((input: PriceInput) => api.post<{ price: Price }>('/api/prices', input), [billingKeys.all]);

export const useWithdrawPrice = () => useApiMutation((id: string) => api.delete<void>(`/api/prices/${id}`), [billingKeys.all]);

export const useAddTaxRate = () => useApiMutation((input: TaxRateInput) => api.post<{ taxRate: TaxRate }>('/api/tax-rates', input), [billingKeys.all]);

export const useWithdrawTaxRate = () => useApiMutation((id: string) => api.delete<void>(`/api/tax-rates/${id}`), [billingKeys.all]);

export const getProfileQueryOptions = () =>
  queryOptions({
    queryKey: billingKeys.profile(),
    queryFn: ({ signal }) => api.get<{ profile: BillingProfile }>('/api/billing/profile', { signal }).then((r) => r.profile),
  });

export const useBillingProfile = () => useQuery(getProfileQueryOptions());

export const useSaveBillingProfile = () =>
  useApiMutation((profile: BillingProfile) => api.put<{ profile: BillingProfile }>('/api/billing/profile', profile), [billingKeys.all]);
