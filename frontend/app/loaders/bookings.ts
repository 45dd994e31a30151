import { queryBooleanSchema } from '../../../shared/schemas/pagination.ts';
import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { defineListQuery, pagingQuerySchema } from '@/components/list-kit';
import { getBookingsQueryOptions } from '@/features/bookings/api/get-bookings';
import { canOnEvery } from '@/lib/ability';

/** The bookings list's page, page size and "include past bookings", as the list reads them from the URL. */
const bookingsListQuery = defineListQuery(pagingQuerySchema(25).extend({ past: queryBooleanSchema }));

/**
 * The list's first request: upcoming bookings start an hour before the list opens, to the minute (the
 * list fixes the same instant when it mounts, so the two agree within the minute), or every booking
 * newest first with the past included.
 */
const bookingsOf = (mine: boolean, search: URLSearchParams) => {
  const { page, pageSize, past: pastToo } = bookingsListQuery.parse(search);
  const past = pastToo === true;
  const since = new Date(Math.floor((Date.now() - 3600_000) / 60_000) * 60_000).toISOString();
  return getBookingsQueryOptions({
    mine,
    page,
    pageSize,
    sort: 'startsAt',
    order: past ? 'desc' : 'asc',
    includeCancelled: true,
    ...(past ? {} : { from: since }),
  });
};

/** One's own bookings. */
export const myBookingsPlan: PrefetchPlan = ({ search }) => [bookingsOf(true, search)];

/** Everyone's bookings, for whoever may see every booking's owner. */
export const allBookingsPlan: PrefetchPlan = ({ search, ability }) => [canOnEvery(ability, 'readOwner', 'Booking') && bookingsOf(false, search)];

export const myBookingsLoader = prefetchLoader(myBookingsPlan);
export const allBookingsLoader = prefetchLoader(allBookingsPlan);
