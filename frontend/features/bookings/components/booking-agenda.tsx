import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import type { Booking } from '../../../../shared/schemas/booking.ts';
import type { Equipment, EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { Button } from '@/components/ui/button';
import { Spinner } from '@/components/ui/spinner';
import { getBookingsInRange } from '@/features/bookings/api/get-bookings';
import { bookingKeys } from '@/features/bookings/api/keys';
import { colours } from '@/features/bookings/components/booking-calendar';
import { formatDate, formatDayMonth, formatTime, formatWeekday } from '@/utils/format';

export interface BookingAgendaProps {
  items: Equipment[];
  kind: EquipmentKind | undefined;
  /** Bump to fetch the bookings again (after booking or cancelling). */
  version: number;
  canBook: boolean;
  /** "Book" on an item: the item and its first free time in the shown week. */
  onPick: (pick: { equipmentId: string; start: Date }) => void;
  onError: (error: unknown) => void;
}

/** Monday 00:00 (local) of the week holding `date`. */
function weekStartOf(date: Date): Date {
  const d = new Date(date);
  d.setHours(0, 0, 0, 0);
  d.setDate(d.getDate() - ((d.getDay() + 6) % 7));
  return d;
}

const addDays = (date: Date, days: number) => {
  const d = new Date(date);
  d.setDate(d.getDate() + days);
  return d;
};

/** The week's days as calendar days ('2026-12-03'), which the formatter never shifts by a time zone. */
const calendarDay = (d: Date) => `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
/** A booking's start or end: "Thu 3 Dec, 14:00" in the co-op's time zone, through the one formatter. */
const when = (iso: string) => `${formatWeekday(iso)} ${formatDayMonth(iso)}, ${formatTime(iso)}`;

/** The first moment from `from` on that none of the item's bookings (buffer included) holds. */
export function firstFreeFrom(from: Date, bookings: Pick<Booking, 'startsAt' | 'blockedUntil'>[]): Date {
  let t = from.getTime();
  const sorted = [...bookings].sort((a, b) => Date.parse(a.startsAt) - Date.parse(b.startsAt));
  for (const b of sorted) if (Date.parse(b.startsAt) <= t && t < Date.parse(b.blockedUntil)) t = Date.parse(b.blockedUntil);
  return new Date(t);
}

/**
 * The Bookings calendar on a phone: one week at a time as a list, an item per card with what holds it
 * that week (yours, taken, kept free for cleaning) and a Book button that starts at its first free time.
 */
export const BookingAgenda = ({ items, kind, version, canBook, onPick, onError }: BookingAgendaProps) => {
  const [weekStart, setWeekStart] = useState(() => weekStartOf(new Date()));
  const weekEnd = addDays(weekStart, 7);
  const from = weekStart.toISOString();
  const to = weekEnd.toISOString();
  const bookings = useQuery({
    queryKey: bookingKeys.range(from, to, kind, version),
    queryFn: ({ signal }) => getBookingsInRange(from, to, kind, signal),
  });
  const { error } = bookings;
  useEffect(() => {
    if (error) onError(error);
  }, [error, onError]);

  const thisWeek = weekStartOf(new Date()).getTime() === weekStart.getTime();
  const title = `${formatDayMonth(calendarDay(weekStart))} – ${formatDate(calendarDay(addDays(weekEnd, -1)))}`;
  const byItem = new Map<string, Booking[]>();
  for (const b of bookings.data ?? []) byItem.set(b.equipmentId, [...(byItem.get(b.equipmentId) ?? []), b]);

  return (
    <section aria-labelledby="booking-agenda-title" className="flex flex-col gap-3" data-testid="booking-agenda">
      <div className="flex items-center justify-between gap-2">
        <Button variant="secondary" size="sm" onClick={() => setWeekStart((w) => addDays(w, -7))}>
          <span aria-hidden="true">‹</span> Previous<span className="sr-only"> week</span>
        </Button>
        <h2 id="booking-agenda-title" className="text-center text-base" aria-live="polite">
          {title}
        </h2>
        <Button variant="secondary" size="sm" onClick={() => setWeekStart((w) => addDays(w, 7))}>
          Next<span className="sr-only"> week</span> <span aria-hidden="true">›</span>
        </Button>
      </div>
      {thisWeek ? null : (
        <Button variant="ghost" size="sm" className="self-center" onClick={() => setWeekStart(weekStartOf(new Date()))}>
          Back to this week
        </Button>
      )}
      {bookings.isPending ? (
        <p className="inline-flex items-center gap-2 text-sm text-ink-muted">
          <Spinner className="size-4 text-copper" /> Loading bookings…
        </p>
      ) : null}
      <ul className="flex flex-col gap-2" aria-label={`Items, week of ${title}`}>
        {items.map((item) => {
          const held = (byItem.get(item.id) ?? []).filter(
            (b) => Date.parse(b.startsAt) < weekEnd.getTime() && Date.parse(b.blockedUntil) > weekStart.getTime(),
          );
          const label = `${item.code} · ${item.name}`;
          return (
            <li key={item.id} className="rounded-lg border border-line bg-surface p-3" data-agenda-item={item.code}>
              <div className="flex items-start justify-between gap-3">
                <h3 className="text-sm font-semibold">{label}</h3>
                {canBook ? (
                  <Button
                    size="sm"
                    className="min-h-11 shrink-0 px-4"
                    aria-label={`Book ${label}`}
                    onClick={() => onPick({ equipmentId: item.id, start: firstFreeFrom(new Date(Math.max(weekStart.getTime(), Date.now())), held) })}
                  >
                    Book
                  </Button>
                ) : null}
              </div>
              {bookings.isPending ? null : held.length === 0 ? (
                <p className="mt-1 text-sm text-ink-muted">Free all week</p>
              ) : (
                <ul className="mt-2 flex flex-col gap-1.5">
                  {held.map((b) => (
                    <BookingLine key={b.id} booking={b} />
                  ))}
                </ul>
              )}
            </li>
          );
        })}
      </ul>
    </section>
  );
};

const BookingLine = ({ booking: b }: { booking: Booking }) => {
  const who = b.mine ? 'Yours' : (b.owner?.name ?? 'Taken');
  const inUse = b.state === 'in_use';
  const colour = b.mine ? (inUse ? colours.mineInUse : colours.mine) : inUse ? colours.takenInUse : colours.taken;
  const buffered = Date.parse(b.blockedUntil) > Date.parse(b.endsAt);
  return (
    <li className={`cw-booking ${b.mine ? 'cw-booking-mine' : 'cw-booking-taken'} text-sm`}>
      <span className="inline-flex flex-wrap items-baseline gap-x-2">
        <span className="rounded-sm px-1.5 py-0.5 text-xs font-medium text-white" style={{ backgroundColor: colour }}>
          {who}
          {inUse ? ' · in use' : ''}
        </span>
        <span>
          {when(b.startsAt)} – {when(b.endsAt)}
        </span>
      </span>
      {buffered ? <span className="block text-xs text-ink-muted">Kept free for cleaning until {when(b.blockedUntil)}</span> : null}
    </li>
  );
};
