import { queryOptions, useQuery } from '@tanstack/react-query';
import type { BookingRules } from '../../../../shared/schemas/settings.ts';
import { bookingKeys } from '@/features/bookings/api/keys';
import { api } from '@/lib/api-client';

export const getBookingRulesQueryOptions = () =>
  queryOptions({
    queryKey: bookingKeys.rules(),
    queryFn: ({ signal }) => api.get<{ rules: BookingRules }>('/api/bookings/rules', { signal }).then((r) => r.rules),
    staleTime: 60_000,
  });

export function useBookingRules() {
  return useQuery(getBookingRulesQueryOptions());
}
