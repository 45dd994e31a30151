import ical, { ICalCalendarMethod, ICalEventStatus } from 'ical-generator';
import type { Booking } from '../../../shared/schemas/booking.ts';
import { equipmentKindLabels } from '../../../shared/schemas/equipment.ts';
import type { Config } from '../../config/env.ts';
import type { OutgoingMail } from '../../lib/mailer.ts';
import { formatWhen } from './bookings.service.ts';

const coop = 'Larkspur Yard Brewing Co-op';

/** The stable UID of a booking's calendar event, so a cancellation replaces the confirmation. */
export const bookingUid = (id: string) => `booking-${id}@cellarwright.example.org`;

/** An RFC 5545 calendar holding one event for the booking (a request, or its cancellation). */
export function bookingIcs(booking: Booking, owner: { name: string; email: string }, config: Config, now: Date, cancelled = false, timeZone = 'UTC'): string {
  const calendar = ical({
    name: `${coop} bookings`,
    prodId: { company: coop, product: 'Cellarwright', language: 'EN' },
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
      `${kind} ${booking.equipment.code} (${booking.equipment.name}) booked for ${owner.name} at ${coop}.\n` +
      `The item is kept free for cleaning until ${formatWhen(new Date(booking.blockedUntil), timeZone)}.\n` +
      `${config.publicUrl}/cellar/${booking.equipmentId}`,
    location: `${coop} cellar`,
    url: `${config.publicUrl}/cellar/${booking.equipmentId}`,
    organizer: { name: coop, email: 'cellar@example.org' },
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
  timeZone: string,
  config: Config,
  now: Date,
  bookedBy?: string,
): OutgoingMail {
  const { code, name, kind } = booking.equipment;
  const lines = [
    `Hello ${owner.name},`,
    '',
    `${bookedBy ? `${bookedBy} has booked` : 'You have booked'} ${equipmentKindLabels[kind].toLowerCase()} ${code} (${name}) for you:`,
    '',
    `  from   ${formatWhen(new Date(booking.startsAt), timeZone)}`,
    `  until  ${formatWhen(new Date(booking.endsAt), timeZone)}`,
    '',
    `After your booking the item is kept free for cleaning until ${formatWhen(new Date(booking.blockedUntil), timeZone)}.`,
    `The attached calendar file adds the booking to your calendar. To cancel, open My bookings: ${config.publicUrl}/bookings/mine`,
    '',
    ...(kind === 'keg' || kind === 'co2_cylinder' || kind === 'tap'
      ? [
          "Safety: never exceed a keg's or regulator's rated pressure, keep pressure-relief valves working and chain cylinders upright.",
          'CO2 displaces air in the closed cold room: keep it ventilated and mind the CO2 alarm. Local codes and licensed practice come first.',
          '',
        ]
      : []),
    `${coop}`,
  ];
  return {
    to: owner.email,
    subject: `Booked: ${code} ${name}, ${formatWhen(new Date(booking.startsAt), timeZone)}`,
    text: lines.join('\n'),
    attachments: [attachment(bookingIcs(booking, owner, config, now, false, timeZone), false)],
  };
}

export function cancellationMail(
  booking: Booking,
  owner: { name: string; email: string },
  timeZone: string,
  config: Config,
  now: Date,
  cancelledBy: string,
): OutgoingMail {
  const { code, name } = booking.equipment;
  const lines = [
    `Hello ${owner.name},`,
    '',
    `Your booking of ${code} (${name}) from ${formatWhen(new Date(booking.startsAt), timeZone)} until ${formatWhen(new Date(booking.endsAt), timeZone)} has been cancelled by ${cancelledBy}.`,
    'The slot is free again for other members. The attached calendar file removes it from your calendar.',
    '',
    `${config.publicUrl}/bookings`,
    '',
    coop,
  ];
  return {
    to: owner.email,
    subject: `Cancelled: ${code} ${name}, ${formatWhen(new Date(booking.startsAt), timeZone)}`,
    text: lines.join('\n'),
    attachments: [attachment(bookingIcs(booking, owner, config, now, true, timeZone), true)],
  };
}
