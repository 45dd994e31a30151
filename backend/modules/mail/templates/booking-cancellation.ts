import type { Booking } from '../../../../shared/schemas/booking.ts';
import { formatWhen, type MailContent } from './parts.ts';

/** To the member whose booking was cancelled, by themselves ("you") or by someone else. */
export function bookingCancellationMail(p: {
  coopName: string;
  appUrl: string;
  timeZone: string;
  booking: Booking;
  ownerName: string;
  cancelledBy: string;
}): MailContent {
  const { booking, timeZone } = p;
  const { code, name } = booking.equipment;
  const lines = [
    `Hello ${p.ownerName},`,
    '',
    `Your booking of ${code} (${name}) from ${formatWhen(new Date(booking.startsAt), timeZone)} until ${formatWhen(new Date(booking.endsAt), timeZone)} has been cancelled by ${p.cancelledBy}.`,
    'The slot is free again for other members. The attached calendar file removes it from your calendar.',
    '',
    `${p.appUrl}/bookings`,
    '',
    p.coopName,
  ];
  return { subject: `Cancelled: ${code} ${name}, ${formatWhen(new Date(booking.startsAt), timeZone)}`, text: lines.join('\n') };
}
