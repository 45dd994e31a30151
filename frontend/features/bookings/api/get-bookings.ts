import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { Booking, BookingListQuery } from '../../../../shared/schemas/booking.ts';
import type { EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { maxPageSize, type Page } from '../../../../shared/schemas/pagination.ts';
import { bookingKeys } from '@/features/bookings/api/keys';
import { api } from '@/lib/api-client';

export const getBookings = (query: Partial<BookingListQuery>, signal?: AbortSignal) =>
  api.get<Page<Booking>>('/api/bookings', { query: { ...query, mine: query.mine ? 1 : undefined }, ...(signal ? { signal } : {}) });

/** Every booking overlapping a period (the calendar's window), page after page. */
export async function getBookingsInRange(from: string, to: string, kind?: EquipmentKind, signal?: AbortSignal): Promise<Booking[]> {
  const out: Booking[] = [];
  for (let page = 1; ; page++) {
    const res = await getBookings({ from, to, kind, page, pageSize: maxPageSize, sort: 'startsAt', order: 'asc' }, signal);
    out.push(...res.items);
    if (out.length >= res.total || res.items.length === 0) return out;
  }
}

export const getBookingsQueryOptions = (query: Partial<BookingListQuery>) =>
  queryOptions({ queryKey: bookingKeys.list(query), queryFn: ({ signal }) => getBookings(query, signal), placeholderData: keepPreviousData });

export function useBookings(query: Partial<BookingListQuery>) {
  return useQuery(getBookingsQueryOptions(query));
}
