import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { cycleListQuery, cyclesQueryOptions, vesselListQuery, vesselStatusQueryOptions } from '@/features/sanitation/api/sanitation';

/** The vessels to clean (or in the state the URL asks for); the section is shown only to whoever may read cycles. */
export const vesselsPlan: PrefetchPlan = ({ search, ability }) => {
  const query = vesselListQuery.parse(search);
  return [ability.can('read', 'SanitationCycle') && vesselStatusQueryOptions({ ...query, state: query.state === 'any' ? undefined : query.state })];
};

/** The sanitation log, as its URL says. */
export const cyclesPlan: PrefetchPlan = ({ search, ability }) => [ability.can('read', 'SanitationCycle') && cyclesQueryOptions(cycleListQuery.parse(search))];

export const vesselsLoader = prefetchLoader(vesselsPlan);
export const cyclesLoader = prefetchLoader(cyclesPlan);
