import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { kegListQuery, kegQueryOptions, kegsQueryOptions, overdueKegsQueryOptions, overdueListQuery, tapBoardQueryOptions } from '@/features/kegs/api/kegs';

// The Kegs section is shown only to whoever may read kegs.

/** The fleet, as its URL says. */
export const kegsPlan: PrefetchPlan = ({ search, ability }) => [ability.can('read', 'Keg') && kegsQueryOptions(kegListQuery.parse(search))];

/** Kegs overdue back, the page in the URL. */
export const overduePlan: PrefetchPlan = ({ search, ability }) => [ability.can('read', 'Keg') && overdueKegsQueryOptions(overdueListQuery.parse(search))];

export const tapBoardPlan: PrefetchPlan = ({ ability }) => [ability.can('read', 'Keg') && tapBoardQueryOptions()];

/** One keg. */
export const kegPlan: PrefetchPlan = ({ params }) => [Boolean(params.kegId) && kegQueryOptions(params.kegId ?? '')];

export const kegsLoader = prefetchLoader(kegsPlan);
export const overdueLoader = prefetchLoader(overduePlan);
export const tapBoardLoader = prefetchLoader(tapBoardPlan);
export const kegLoader = prefetchLoader(kegPlan);
