import { useQuery } from '@tanstack/react-query';
import type { CarbonationPlanView, CreateCarbonationPlanInput } from '../../../../shared/schemas/carbonation.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { carbonationKeys } from '@/features/carbonation/api/keys';
import { kegKeys } from '@/features/kegs/api/keys';

export const usePlansForKeg = (kegId: string, enabled = true) =>
  useQuery({
    queryKey: carbonationKeys.keg(kegId),
    queryFn: ({ signal }) => api.get<Page<CarbonationPlanView>>('/api/carbonation-plans', { query: { kegId, pageSize: 20 }, signal }),
    enabled: enabled && Boolean(kegId),
  });

export const useLowerDuePlans = (enabled = true) =>
  useQuery({
    queryKey: carbonationKeys.lowerDue(),
    queryFn: ({ signal }) =>
      api.get<Page<CarbonationPlanView>>('/api/carbonation-plans', { query: { lowerDue: 'true', sort: 'lowerPressureAt', order: 'asc' }, signal }),
    enabled,
  });

const planStale = [carbonationKeys.all, kegKeys.all];

export const useCreatePlan = () =>
  useApiMutation((input: CreateCarbonationPlanInput) => api.post<{ plan: CarbonationPlanView }>('/api/carbonation-plans', input), planStale);

export const usePlanAction = () =>
  useApiMutation(
    ({ planId, action }: { planId: string; action: 'pressure-lowered' | 'done' | 'cancelled' }) =>
      action === 'pressure-lowered'
        ? api.post<{ plan: CarbonationPlanView }>(`/api/carbonation-plans/${encodeURIComponent(planId)}/pressure-lowered`)
        : api.patch<{ plan: CarbonationPlanView }>(`/api/carbonation-plans/${encodeURIComponent(planId)}`, { state: action }),
    planStale,
  );
