import { formatMoney } from '../../../shared/billing/money.ts';
import type { Deps } from '../../lib/deps.ts';
import { conflict } from '../../lib/http-problem.ts';
import { enqueueMail } from '../../lib/mailer.ts';
import { invoiceMail } from '../mail/templates/invoice.ts';
import { coopToday } from './billing-profile.service.ts';
import { lockInvoiceStatus } from './invoice-commands.repository.ts';
import { invoicePdfFilename, renderInvoicePdf } from './invoice-pdf.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { getDetail, issueInvoice, markSent } from './invoices.service.ts';

/**
 * E-mails an invoice with its PDF through the mail queue (retried there until the mail server takes
 * it). A draft is issued first, so a member only ever receives numbered invoices.
 */
export async function sendInvoice({ db, config, queue, clock }: Deps, invoiceId: string, actorId: string) {
  const now = clock.now();
  await db.transaction().execute(async (trx) => {
    const row = await lockInvoiceStatus(trx, invoiceId);
    if (row.status === 'void') throw conflict('A void invoice is not sent; its credit note replaces it.');
    if (row.status === 'draft') {
      const { today } = await coopToday(trx, now);
      await issueInvoice(trx, invoiceId, today, actorId, now);
    }
  });
  const { today } = await coopToday(db, now);
  const invoice = await getDetail(db, invoiceId, today);
  const profile = await coopProfile(db);
  const pdf = await renderInvoicePdf({ invoice, profile, appUrl: config.publicUrl, producedAt: now });
  const total = formatMoney(invoice.totalCents, invoice.currency, 'en-GB');
  const due = formatMoney(invoice.amountDueCents, invoice.currency, 'en-GB');
  await enqueueMail(queue, {
    to: invoice.memberEmail,
    ...invoiceMail({ profile, appUrl: config.publicUrl, invoice, total, due }),
    attachments: [{ filename: invoicePdfFilename(invoice), contentType: 'application/pdf', contentBase64: pdf.toString('base64') }],
  });
  await db.transaction().execute((trx) => markSent(trx, invoice.id, actorId, invoice.memberEmail, now));
  return { to: invoice.memberEmail, invoice: await getDetail(db, invoiceId, today) };
}
