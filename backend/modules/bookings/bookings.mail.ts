import ical, { ICalCalendarMethod, ICalEventStatus } from 'ical-generator';
import type { Booking } from '../../../shared/schemas/booking.ts';
import { equipmentKindLabels } from '../../../shared/schemas/equipment.ts';
import type { Config } from '../../config/env.ts';
import type { OutgoingMail } from '../../lib/mailer.ts';
import { bookingCancellationMail } from '../mail/templates/booking-cancellation.ts';
import { bookingConfirmationMail } from '../mail/templates/booking-confirmation.ts';
import { formatWhen } from '../mail/templates/parts.ts';
import type { CoopProfile } from '../settings/settings.service.ts';

/** What a booking mail says of the co-op: its name and time zone (from `coopProfile()`). */
export type BookingMailCoop = Pick<CoopProfile, 'coopName' | 'timeZone'>;

/** The stable UID of a booking's calendar event, so a cancellation replaces the confirmation. */
export const bookingUid = (id: string) => `booking-${id}@cellarwright.example.org`;

/** An RFC 5545 calendar holding one event for the booking (a request, or its cancellation). */
export function bookingIcs(
  booking: Booking,
  owner: { name: string; email: string },
  coop: BookingMailCoop,
  config: Config,
  now: Date,
  cancelled = false,
): string {
  const { coopName, timeZone } = coop;
  const calendar = ical({
    name: `${coopName} bookings`,
    prodId: { company: coopName, product: 'Cellarwright', language: 'EN' },
    method: cancelled ? ICalCalendarMethod.CANCEL : ICalCalendarMethod.PUBLISH,
  });
  const kind = equipmentKindLabels[booking.equipment.kind];
  calendar.createEvent({
    id: bookingUid(booking.id),
    sequence: cancelled ? 1 : 0,
    stamp: now,
    start: new Date(booking.startsAt),
    end: new Date(booking.endsAt),
    summary: `${cancelled ? 'Cancelled: ' : ''}${booking.equipment.code} ${booking.equipment.name}`,
    description:
      `${kind} ${booking.equipment.code} (${booking.equipment.name}) booked for ${owner.name} at ${coopName}.\n` +
      `The item is kept free for cleaning until ${formatWhen(new Date(booking.blockedUntil), timeZone)}.\n` +
      `${config.publicUrl}/cellar/${booking.equipmentId}`,
    location: `${coopName} cellar`,
    url: `${config.publicUrl}/cellar/${booking.equipmentId}`,
    organizer: { name: coopName, email: 'cellar@example.org' },
    status: cancelled ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
  });
  return calendar.toString();
}

function attachment(ics: string, cancelled: boolean) {
  return {
    filename: cancelled ? 'booking-cancelled.ics' : 'booking.ics',
    contentType: `text/calendar; charset=utf-8; method=${cancelled ? 'CANCEL' : 'PUBLISH'}`,
    contentBase64: Buffer.from(ics, 'utf8').toString('base64'),
  };
}

export function confirmationMail(
  booking: Booking,
  owner: { name: string; email: string },
  coop: BookingMailCoop,
  config: Config,
  now: Date,
  bookedBy?: string,
): OutgoingMail {
  return {
    to: owner.email,
    ...bookingConfirmationMail({ ...coop, appUrl: config.publicUrl, booking, ownerName: owner.name, ...(bookedBy ? { bookedBy } : {}) }),
    attachments: [attachment(bookingIcs(booking, owner, coop, config, now, false), false)],
  };
}

export function cancellationMail(
  booking: Booking,
  owner: { name: string; email: string },
  coop: BookingMailCoop,
  config: Config,
  now: Date,
  cancelledBy: string,
): OutgoingMail {
  return {
    to: owner.email,
    ...bookingCancellationMail({ ...coop, appUrl: config.publicUrl, booking, ownerName: owner.name, cancelledBy }),
    attachments: [attachment(bookingIcs(booking, owner, coop, config, now, true), true)],
  };
}
