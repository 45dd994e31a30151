import { createCalendar, destroyCalendar, Interaction, ResourceTimeline, type Calendar } from '@event-calendar/core';
import '@event-calendar/core/index.css';
import './booking-calendar.css';
import { useEffect, useRef } from 'react';
import type { Booking } from '../../../../shared/schemas/booking.ts';
import type { Equipment, EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { getBookingsInRange } from '@/features/bookings/api/get-bookings';

export type CalendarView = 'resourceTimelineWeek' | 'resourceTimelineMonth';

export interface BookingCalendarProps {
  items: Equipment[];
  kind: EquipmentKind | undefined;
  /** Bump to fetch the bookings again (after booking or cancelling). */
  version: number;
  /** A free slot was picked: an item and a start (a click) or a period (a drag). */
  onPick: (pick: { equipmentId: string; start: Date; end?: Date }) => void;
  onError: (error: unknown) => void;
}

// Our colours: copper for yours, warm grey for others' ("taken"), amber hatching for the cleaning buffer.
// White titles on each need 4.5:1 at least: copper 4.9:1, dark copper 6.9:1, ink-muted 7.3:1, darker 11.5:1.
export const colours = { mine: '#b0592a', mineInUse: '#8f4520', taken: '#5c564d', takenInUse: '#3d3933', buffer: '#efd08f' };

/** The calendar draws a grid of boxes, not a table: the table roles it gives them are wrong, so they go. */
const gridRoles = ['table', 'row', 'rowgroup', 'rowheader', 'columnheader', 'cell', 'gridcell'];
const gridRoleSelector = gridRoles.map((r) => `[role="${r}"]`).join(',');
const gridAttributes = ['aria-colindex', 'aria-colspan', 'aria-rowindex', 'aria-rowspan', 'aria-colcount', 'aria-rowcount'];

/**
 * Corrects what the calendar draws for assistive technology: no table roles on a grid of boxes (the
 * item names, day headers and bookings read as text in order), and its sideways-scrolling area a named
 * region that takes focus so the arrow keys scroll it. Idempotent: it runs again after every redraw.
 */
export function correctCalendarMarkup(root: HTMLElement) {
  for (const el of root.querySelectorAll(gridRoleSelector)) el.removeAttribute('role');
  for (const attr of gridAttributes) for (const el of root.querySelectorAll(`[${attr}]`)) el.removeAttribute(attr);
  for (const el of root.querySelectorAll<HTMLElement>('.ec-main')) {
    if (el.getAttribute('tabindex') !== '0') el.setAttribute('tabindex', '0');
    if (el.getAttribute('role') !== 'region') el.setAttribute('role', 'region');
    if (el.getAttribute('aria-label') !== 'Bookings by item and day') el.setAttribute('aria-label', 'Bookings by item and day');
  }
}

export function toEvents(bookings: Booking[]): Calendar.EventInput[] {
  const events: Calendar.EventInput[] = [];
  for (const b of bookings) {
    const who = b.mine ? 'Yours' : (b.owner?.name ?? 'Taken');
    events.push({
      id: b.id,
      resourceId: b.equipmentId,
      start: new Date(b.startsAt),
      end: new Date(b.endsAt),
      title: `${who}${b.state === 'in_use' ? ' · in use' : ''}`,
      color: b.mine ? (b.state === 'in_use' ? colours.mineInUse : colours.mine) : b.state === 'in_use' ? colours.takenInUse : colours.taken,
      classNames: ['cw-booking', b.mine ? 'cw-booking-mine' : 'cw-booking-taken'],
      extendedProps: { bookingId: b.id, mine: b.mine },
    });
    if (new Date(b.blockedUntil) > new Date(b.endsAt)) {
      events.push({
        id: `${b.id}-buffer`,
        resourceId: b.equipmentId,
        start: new Date(b.endsAt),
        end: new Date(b.blockedUntil),
        display: 'background',
        color: colours.buffer,
        classNames: ['cw-buffer'],
      });
    }
  }
  return events;
}

/**
 * The Bookings calendar: one row per item, time across, week and month views, drawn by the
 * resource timeline of @event-calendar/core. Bookings load for the visible window only.
 */
export const BookingCalendar = ({ items, kind, version, onPick, onError }: BookingCalendarProps) => {
  const host = useRef<HTMLDivElement>(null);
  const calendar = useRef<Calendar | null>(null);
  const latest = useRef({ onPick, onError, kind });
  latest.current = { onPick, onError, kind };

  useEffect(() => {
    if (!host.current) return;
    const now = new Date();
    calendar.current = createCalendar(host.current, [ResourceTimeline, Interaction], {
      view: 'resourceTimelineMonth',
      date: now,
      firstDay: 1,
      locale: 'en-GB',
      height: 'auto',
      nowIndicator: true,
      selectable: true,
      // Bookings run for days: their titles say whose, not the hour.
      eventTimeFormat: () => '',
      headerToolbar: { start: 'prev,today,next', center: 'title', end: 'resourceTimelineWeek,resourceTimelineMonth' },
      buttonText: (text) => ({ ...text, resourceTimelineWeek: 'Week', resourceTimelineMonth: 'Month', today: 'Today' }),
      views: {
        resourceTimelineWeek: { slotDuration: '06:00', slotLabelInterval: '06:00', slotWidth: 40 },
        resourceTimelineMonth: { slotDuration: { days: 1 }, slotWidth: 44 },
      },
      resources: [],
      eventSources: [
        {
          events: async (info: Calendar.FetchInfo) => {
            try {
              return toEvents(await getBookingsInRange(info.start.toISOString(), info.end.toISOString(), latest.current.kind));
            } catch (error) {
              latest.current.onError(error);
              return [];
            }
          },
        },
      ],
      dateClick: (info) => {
        if (info.resource) latest.current.onPick({ equipmentId: String(info.resource.id), start: info.date });
      },
      select: (info) => {
        if (info.resource) latest.current.onPick({ equipmentId: String(info.resource.id), start: info.start, end: info.end });
        calendar.current?.unselect();
      },
    });
    const root = host.current;
    correctCalendarMarkup(root);
    const redrawn = new MutationObserver(() => correctCalendarMarkup(root));
    redrawn.observe(root, { subtree: true, childList: true, attributes: true, attributeFilter: ['role', 'tabindex', 'aria-label', ...gridAttributes] });
    return () => {
      redrawn.disconnect();
      if (calendar.current) void destroyCalendar(calendar.current);
      calendar.current = null;
    };
  }, []);

  useEffect(() => {
    calendar.current?.setOption(
      'resources',
      items.map((i) => ({ id: i.id, title: `${i.code} · ${i.name}`, extendedProps: { code: i.code, state: i.state } })),
    );
  }, [items]);

  useEffect(() => {
    calendar.current?.refetchEvents();
  }, [version, kind]);

  return <div ref={host} className="cw-calendar" data-testid="booking-calendar" role="group" aria-label="Bookings calendar" />;
};
