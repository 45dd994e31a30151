import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getBatchQueryOptions } from '@/features/batches/api/get-batch';
import { batchListQuery, getBatchesQueryOptions } from '@/features/batches/api/get-batches';

/** The batches list, as its URL says. */
export const batchesPlan: PrefetchPlan = ({ search }) => [getBatchesQueryOptions(batchListQuery.parse(search))];

/** One batch. */
export const batchPlan: PrefetchPlan = ({ params }) => [Boolean(params.batchId) && getBatchQueryOptions(params.batchId ?? '')];

export const batchesLoader = prefetchLoader(batchesPlan);
export const batchLoader = prefetchLoader(batchPlan);
