import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getBatchQueryOptions } from '@/features/batches/api/get-batch';
import { batchListQuery, getBatchesQueryOptions } from '@/features/batches/api/get-batches';
import { getProductionRecordsQueryOptions } from '@/features/batches/api/get-production-records';
import { getTraceReportQueryOptions } from '@/features/batches/api/get-trace';

const DAY = 86_400_000;
/** The month `offset` months from this one ('2026-12'), as the production records screen opens on. */
const monthFromNow = (offset: number) => {
  const d = new Date();
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + offset, 1)).toISOString().slice(0, 7);
};
/** The day `offset` days from today ('2026-12-05'), as the trace report opens on. */
const dayFromNow = (offset: number) => new Date(Date.now() + offset * DAY).toISOString().slice(0, 10);

/** The batches list, as its URL says. */
export const batchesPlan: PrefetchPlan = ({ search }) => [getBatchesQueryOptions(batchListQuery.parse(search))];

/** One batch. */
export const batchPlan: PrefetchPlan = ({ params }) => [Boolean(params.batchId) && getBatchQueryOptions(params.batchId ?? '')];

/** The production records of the last three months and this one, the range the screen opens on. */
export const productionRecordsPlan: PrefetchPlan = () => [getProductionRecordsQueryOptions(monthFromNow(-3), monthFromNow(0))];

/** The trace report of the last 90 days, the range the screen opens on. */
export const traceReportPlan: PrefetchPlan = () => [getTraceReportQueryOptions(dayFromNow(-90), dayFromNow(0))];

export const batchesLoader = prefetchLoader(batchesPlan);
export const batchLoader = prefetchLoader(batchPlan);
export const productionRecordsLoader = prefetchLoader(productionRecordsPlan);
export const traceReportLoader = prefetchLoader(traceReportPlan);
