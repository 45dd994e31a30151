import { describe, expect, it } from 'vitest';
import { defaultLocale, formatDateTime, formatWeekday } from '../../../../../shared/format/index.ts';
import type { Booking } from '../../../../../shared/schemas/booking.ts';
import { bookingCancellationMail } from '../booking-cancellation.ts';
import { bookingConfirmationMail } from '../booking-confirmation.ts';
import { invitationMail } from '../invitation.ts';
import { invoiceMail } from '../invoice.ts';
import { invoiceReminderMail } from '../invoice-reminder.ts';
import { kegReminderMail } from '../keg-reminder.ts';
import { formatWhen } from '../parts.ts';
import { passwordResetMail } from '../password-reset.ts';
import { receiptMail } from '../receipt.ts';
import { signInLockedMail } from '../sign-in-locked.ts';

// A name no default holds: each template must say the co-op's name it is given.
const coopName = 'Quarry Lane Brewers';
const profile = { coopName, email: 'money@quarry.example', bankAccountName: 'Quarry Lane Brewers', bankAccount: 'QL 12 34' };
const appUrl = 'https://cellar.example';
const timeZone = 'Pacific/Auckland';
const at = new Date('2031-03-09T22:30:00Z');

const booking: Booking = {
  id: 'b1',
  equipmentId: 'e1',
  equipment: { code: 'KEG-07', name: 'Corny seven', kind: 'keg' },
  startsAt: at.toISOString(),
  endsAt: new Date(at.getTime() + 2 * 86_400_000).toISOString(),
  blockedUntil: new Date(at.getTime() + 3 * 86_400_000).toISOString(),
  state: 'booked',
  mine: true,
  createdAt: at.toISOString(),
  cancelledAt: null,
};

describe('e-mail templates', () => {
  it('formats instants through the one formatter, in the time zone given', () => {
    const ctx = { locale: defaultLocale, timeZone };
    expect(formatWhen(at, timeZone)).toBe(`${formatWeekday(at, ctx)} ${formatDateTime(at, ctx)} (${timeZone})`);
    // 22:30 UTC on the 9th is the next morning in Auckland.
    expect(formatWhen(at, timeZone)).toContain('10');
  });

  it('names the co-op it is given in account mails', () => {
    const invite = invitationMail({ coopName, name: 'Ada', invitedBy: 'Ben', link: `${appUrl}/invitation?token=t` });
    expect(invite.subject).toBe(`You are invited to Cellarwright at ${coopName}`);
    expect(invite.text).toContain('Ben has invited you');
    expect(invite.text).toContain(`${appUrl}/invitation?token=t`);
    const locked = signInLockedMail({ coopName, name: 'Ada', failures: 20, lockMinutes: 60, link: 'L', linkHours: 24 });
    expect(locked.text).toContain(`20 failed attempts to sign in to your Cellarwright account at ${coopName}`);
    expect(locked.text).toContain('locked for 60 minutes');
    const reset = passwordResetMail({ coopName, name: 'Ada', link: 'R' });
    expect(reset.subject).toBe('Reset your Cellarwright password');
    expect(reset.text).toContain(`account at ${coopName}`);
    for (const mail of [invite, locked, reset]) expect(mail.text).not.toContain('Larkspur');
  });

  it('writes booking mails with dates in the co-op time zone and gas safety for kegs', () => {
    const confirmed = bookingConfirmationMail({ coopName, appUrl, timeZone, booking, ownerName: 'Ada', bookedBy: 'Ben' });
    expect(confirmed.subject).toBe(`Booked: KEG-07 Corny seven, ${formatWhen(at, timeZone)}`);
    expect(confirmed.text).toContain('Ben has booked keg KEG-07');
    expect(confirmed.text).toContain('CO2 displaces air');
    expect(confirmed.text.trimEnd().endsWith(coopName)).toBe(true);
    const cancelled = bookingCancellationMail({ coopName, appUrl, timeZone, booking, ownerName: 'Ada', cancelledBy: 'you' });
    expect(cancelled.subject).toBe(`Cancelled: KEG-07 Corny seven, ${formatWhen(at, timeZone)}`);
    expect(cancelled.text).toContain('has been cancelled by you');
    expect(cancelled.text).toContain(`${appUrl}/bookings`);
  });

  it('writes the invoice, its reminder and the receipt with the co-op’s payment details', () => {
    const invoice = { id: 'i1', number: 'CW-2031-0042', period: '2031-02', memberName: 'Ada', amountDueCents: 1250, dueOn: '2031-03-14' };
    const sent = invoiceMail({ profile, appUrl, invoice, total: '€12.50', due: '€12.50' });
    expect(sent.subject).toBe(`Invoice CW-2031-0042 from ${coopName} — February 2031`);
    expect(sent.text).toContain('Still to pay: €12.50, by 14 Mar 2031.');
    expect(sent.text).toContain(`- by bank transfer to ${profile.bankAccountName}, account QL 12 34, quoting CW-2031-0042`);
    expect(invoiceMail({ profile, appUrl, invoice: { ...invoice, amountDueCents: 0 }, total: '€12.50', due: '€0.00' }).text).toContain(
      'Nothing is left to pay',
    );

    const reminder = invoiceReminderMail({ profile, appUrl, timeZone, now: at, memberName: 'Ada', invoice, amount: '€12.50' });
    expect(reminder.subject).toBe('Reminder: invoice CW-2031-0042 is overdue — €12.50 to pay');
    expect(reminder.text).toContain(`(As of ${formatWhen(at, timeZone)}.)`);
    expect(reminder.text).toContain(`Questions? Write to ${profile.email}.`);

    const receipt = receiptMail({
      profile,
      memberName: 'Ada',
      invoice: { number: invoice.number, period: invoice.period, totalCents: 1250 },
      payment: { amountCents: 1500, overpaidCents: 250, method: 'bank_transfer', receivedOn: '2031-03-10', reference: 'REF-1' },
      remainingCents: 0,
      money: (c) => `€${(c / 100).toFixed(2)}`,
    });
    expect(receipt.subject).toBe('Receipt: €15.00 received for invoice CW-2031-0042');
    expect(receipt.text).toContain('Bank transfer (REF-1)');
    expect(receipt.text).toContain('the invoice is paid in full');
    expect(receipt.text).toContain('€2.50 of it was more than the invoice owed');
    expect(receipt.text.trimEnd().endsWith(coopName)).toBe(true);
  });

  it('reminds of a keg with its due time in the co-op time zone', () => {
    const mail = kegReminderMail({
      coopName,
      appUrl,
      timeZone,
      memberName: 'Ada',
      keg: { id: 'k1', code: 'KEG-07', name: 'Corny seven', dueAt: at, checkedOutAt: null },
    });
    expect(mail.subject).toBe(`Reminder: keg KEG-07 was due back ${formatWhen(at, timeZone)}`);
    expect(mail.text).toContain('Release the pressure before you carry it');
    expect(mail.text).toContain(`${appUrl}/kegs/k1`);
    expect(mail.text).toContain('went out with you and was due back');
  });
});
