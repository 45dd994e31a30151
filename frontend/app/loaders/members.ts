import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getUsersQueryOptions, userListQuery } from '@/features/users/api/get-users';
import { canOnEvery } from '@/lib/ability';

/** The members directory, as its URL says; the section is shown only to whoever may update every person. */
export const membersPlan: PrefetchPlan = ({ search, ability }) => [canOnEvery(ability, 'update', 'User') && getUsersQueryOptions(userListQuery.parse(search))];

export const membersLoader = prefetchLoader(membersPlan);
