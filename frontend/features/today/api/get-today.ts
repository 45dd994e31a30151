import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Today } from '../../../../shared/schemas/today.ts';
import { api } from '@/lib/api-client';

export const todayKeys = { all: ['today'] as const };

export const getToday = () => api.get<Today>('/api/today');

export const getTodayQueryOptions = () => queryOptions({ queryKey: todayKeys.all, queryFn: getToday, refetchInterval: 5 * 60_000 });

export const useToday = () => useQuery(getTodayQueryOptions());
