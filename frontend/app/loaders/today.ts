import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getTodayQueryOptions } from '@/features/today/api/get-today';

export const todayPlan: PrefetchPlan = () => [getTodayQueryOptions()];

export const todayLoader = prefetchLoader(todayPlan);
