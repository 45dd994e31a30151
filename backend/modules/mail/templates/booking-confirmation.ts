import type { Booking } from '../../../../shared/schemas/booking.ts';
import { equipmentKindLabels } from '../../../../shared/schemas/equipment.ts';
import { formatWhen, type MailContent } from './parts.ts';

/** To the member a booking is for: what, when, the cleaning buffer, and gas safety for kegs, taps and cylinders. */
export function bookingConfirmationMail(p: {
  coopName: string;
  appUrl: string;
  timeZone: string;
  booking: Booking;
  ownerName: string;
  /** Who booked it, when not the member themselves. */
  bookedBy?: string;
}): MailContent {
  const { booking, timeZone } = p;
  const { code, name, kind } = booking.equipment;
  const lines = [
    `Hello ${p.ownerName},`,
    '',
    `${p.bookedBy ? `${p.bookedBy} has booked` : 'You have booked'} ${equipmentKindLabels[kind].toLowerCase()} ${code} (${name}) for you:`,
    '',
    `  from   ${formatWhen(new Date(booking.startsAt), timeZone)}`,
    `  until  ${formatWhen(new Date(booking.endsAt), timeZone)}`,
    '',
    `After your booking the item is kept free for cleaning until ${formatWhen(new Date(booking.blockedUntil), timeZone)}.`,
    `The attached calendar file adds the booking to your calendar. To cancel, open My bookings: ${p.appUrl}/bookings/mine`,
    '',
    ...(kind === 'keg' || kind === 'co2_cylinder' || kind === 'tap'
      ? [
          "Safety: never exceed a keg's or regulator's rated pressure, keep pressure-relief valves working and chain cylinders upright.",
          'CO2 displaces air in the closed cold room: keep it ventilated and mind the CO2 alarm. Local codes and licensed practice come first.',
          '',
        ]
      : []),
    p.coopName,
  ];
  return { subject: `Booked: ${code} ${name}, ${formatWhen(new Date(booking.startsAt), timeZone)}`, text: lines.join('\n') };
}
