import { longDate, periodLabel } from '../../../../shared/billing/dates.ts';
import { formatWhen, howToPay, type MailContent, type PaymentDetails } from './parts.ts';

/** To a member with an overdue invoice: what is still to pay and how. */
export function invoiceReminderMail(p: {
  profile: PaymentDetails & { coopName: string };
  appUrl: string;
  timeZone: string;
  now: Date;
  memberName: string;
  invoice: { id: string; number: string | null; period: string; dueOn: string };
  /** The amount still due, already formatted in the invoice's currency. */
  amount: string;
}): MailContent {
  const { invoice } = p;
  return {
    subject: `Reminder: invoice ${invoice.number} is overdue — ${p.amount} to pay`,
    text: [
      `Hello ${p.memberName},`,
      '',
      `Our records show that invoice ${invoice.number} for ${periodLabel(invoice.period)} was due on ${longDate(invoice.dueOn)} and ${p.amount} of it is still to pay.`,
      `(As of ${formatWhen(p.now, p.timeZone)}.) If you have paid in the meantime, thank you, and please ignore this reminder.`,
      '',
      ...howToPay(invoice, p.profile, p.appUrl),
    ].join('\n'),
  };
}
