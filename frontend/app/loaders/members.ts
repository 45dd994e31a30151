import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { defineListQuery, pagingQuerySchema } from '@/components/list-kit';
import { getMailboxQueryOptions } from '@/features/mailbox/api/get-mailbox';
import { getUsersQueryOptions, userListQuery } from '@/features/users/api/get-users';
import { canOnEvery } from '@/lib/ability';

/** The members directory, as its URL says; the section is shown only to whoever may update every person. */
export const membersPlan: PrefetchPlan = ({ search, ability }) => [canOnEvery(ability, 'update', 'User') && getUsersQueryOptions(userListQuery.parse(search))];

/** The outbox's page, as the URL says (the message opened in it is read from the page already fetched). */
const outboxPaging = defineListQuery(pagingQuerySchema());

/** The outbox, for whoever may read it. */
export const outboxPlan: PrefetchPlan = ({ search, ability }) => {
  const { page, pageSize } = outboxPaging.parse(search);
  return [ability.can('read', 'Mailbox') && getMailboxQueryOptions({ page, pageSize })];
};

export const membersLoader = prefetchLoader(membersPlan);
export const outboxLoader = prefetchLoader(outboxPlan);
