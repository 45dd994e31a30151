import { longDate, periodLabel } from '../../../../shared/billing/dates.ts';
import { howToPay, type MailContent, type PaymentDetails } from './parts.ts';

/** The e-mail an issued invoice is sent with (its PDF attached by the caller). */
export function invoiceMail(p: {
  profile: PaymentDetails & { coopName: string };
  appUrl: string;
  invoice: { id: string; number: string | null; period: string; memberName: string; amountDueCents: number; dueOn: string | null };
  /** The invoice's total and what is still due, already formatted in its currency. */
  total: string;
  due: string;
}): MailContent {
  const { invoice } = p;
  return {
    subject: `Invoice ${invoice.number} from ${p.profile.coopName} — ${periodLabel(invoice.period)}`,
    text: [
      `Hello ${invoice.memberName},`,
      '',
      `Your invoice ${invoice.number} for ${periodLabel(invoice.period)} is attached: ${p.total} in all.`,
      invoice.amountDueCents > 0 ? `Still to pay: ${p.due}, by ${longDate(invoice.dueOn!)}.` : 'Nothing is left to pay on it — thank you.',
      '',
      ...howToPay(invoice, p.profile, p.appUrl),
    ].join('\n'),
  };
}
