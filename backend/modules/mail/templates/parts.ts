import { defaultLocale, formatDateTime, formatWeekday } from '../../../../shared/format/index.ts';

/** What every template returns: the subject and the plain-text body. */
export interface MailContent {
  subject: string;
  text: string;
}

/** An instant as the co-op reads it: "Tue 12 Nov 2024, 14:30 (Europe/Dublin)", through the one formatter. */
export function formatWhen(at: Date, timeZone: string): string {
  const ctx = { locale: defaultLocale, timeZone };
  return `${formatWeekday(at, ctx)} ${formatDateTime(at, ctx)} (${timeZone})`;
}

/** The co-op's bank details as an invoice mail quotes them. */
export interface PaymentDetails {
  bankAccountName: string;
  bankAccount: string;
  email: string;
}

/** The "How to pay" block and the closing lines of a mail about an invoice. */
export function howToPay(invoice: { id: string; number: string | null }, profile: PaymentDetails & { coopName: string }, appUrl: string): string[] {
  return [
    'How to pay:',
    `- online: ${appUrl}/billing/my-invoices/${invoice.id}`,
    `- by bank transfer to ${profile.bankAccountName}, account ${profile.bankAccount}, quoting ${invoice.number}`,
    '',
    `Questions? Write to ${profile.email}.`,
    '',
    profile.coopName,
  ];
}
