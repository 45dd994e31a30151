import { longDate, periodLabel } from '../../../../shared/billing/dates.ts';
import { paymentMethodLabels, type PaymentMethod } from '../../../../shared/schemas/billing.ts';
import type { MailContent } from './parts.ts';

/** The member's receipt for a payment received. */
export function receiptMail(p: {
  profile: { coopName: string; email: string };
  memberName: string;
  invoice: { number: string | null; period: string; totalCents: number };
  payment: { amountCents: number; overpaidCents: number; method: PaymentMethod; receivedOn: string; reference: string | null };
  remainingCents: number;
  /** Formats cents in the payment's currency. */
  money: (cents: number) => string;
}): MailContent {
  const { invoice, payment, money } = p;
  return {
    subject: `Receipt: ${money(payment.amountCents)} received for invoice ${invoice.number}`,
    text: [
      `Hello ${p.memberName},`,
      '',
      `Thank you: we received your payment for invoice ${invoice.number} (${periodLabel(invoice.period)}).`,
      '',
      `  amount      ${money(payment.amountCents)}`,
      `  received    ${longDate(payment.receivedOn)}`,
      `  method      ${paymentMethodLabels[payment.method]}${payment.reference ? ` (${payment.reference})` : ''}`,
      `  invoice     ${invoice.number}, ${money(invoice.totalCents)} in all`,
      `  still due   ${money(p.remainingCents)}${p.remainingCents === 0 ? ' — the invoice is paid in full' : ''}`,
      ...(payment.overpaidCents > 0
        ? ['', `${money(payment.overpaidCents)} of it was more than the invoice owed; the treasurer will pay it back to you.`]
        : []),
      '',
      `Keep this e-mail as your receipt. Questions? Write to ${p.profile.email}.`,
      '',
      p.profile.coopName,
    ].join('\n'),
  };
}
