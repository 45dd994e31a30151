import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createInvoice, createInvoicePayment, createMember, type InvoiceWithLines } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, desktop, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { pdfText } from '../helpers/pdf.ts';

// The treasurer credits part of a part-paid invoice and leaves the dialog's choices as they are: a credit
// is recorded and nothing is paid back, and the credit note's PDF says only that.

let ctx: TestContext, server: Served, browser: Browser;
let invoice: InvoiceWithLines;

beforeAll(async () => {
  ctx = await createTestContext();
  // A member of this file's own, billed November's dues on 1 December and part-paid 10.00 by bank transfer.
  const member = await createMember(ctx.db, { email: 'part-paid.e2e@example.org', createdAt: '2026-10-01T09:00:00Z' });
  invoice = await createInvoice(ctx.db, { memberId: member.id, period: '2026-11', today: '2026-12-01', actorId: fixtureUserId('treasurer') });
  await createInvoicePayment(ctx.db, { invoiceId: invoice.id, amountCents: 1000, receivedOn: '2026-12-01', actorId: fixtureUserId('treasurer') });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

describe('crediting part of a part-paid invoice', () => {
  it('leaving the dialog’s defaults records a credit only: no refund, and the PDF does not say money was paid back', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'treasurer@example.org', { viewport: desktop, context: { locale: 'en-GB' } });
    await page.goto(`/billing/invoices/${invoice.id}`);
    await page.getByRole('heading', { name: invoice.number! }).waitFor();
    await page.getByRole('button', { name: 'Credit or refund' }).click();
    const dialog = page.getByRole('dialog', { name: `Credit or refund part of ${invoice.number}` });
    await dialog.waitFor();
    // What is true unless the treasurer says otherwise: nothing has gone back yet.
    expect(await dialog.getByRole('radio', { name: /No, a credit only/ }).isChecked()).toBe(true);
    for (const way of [/paid back by bank transfer/, /paid back in cash/]) expect(await dialog.getByRole('radio', { name: way }).isChecked()).toBe(false);
    await dialog.getByLabel('Amount to credit, tax included').fill('5.00');
    await dialog.getByLabel('Reason').fill('Dues waived for a week away');
    await screenshot(page, 'billing-treasurer-credit-part-paid');
    await dialog.getByRole('button', { name: 'Issue the credit note' }).click();
    await dialog.waitFor({ state: 'detached' });

    const notes = await ctx.db.selectFrom('credit_note').select(['id', 'number', 'total_cents']).where('invoice_id', '=', invoice.id).execute();
    expect(notes).toEqual([{ id: expect.any(String), number: expect.any(String), total_cents: 500 }]);
    const payments = await ctx.db.selectFrom('payment').select(['amount_cents', 'credit_note_id']).where('invoice_id', '=', invoice.id).execute();
    expect(payments).toEqual([{ amount_cents: 1000, credit_note_id: null }]);
    const row = await ctx.db.selectFrom('invoice').select(['status', 'paid_cents', 'credited_cents']).where('id', '=', invoice.id).executeTakeFirstOrThrow();
    expect(row).toEqual({ status: 'issued', paid_cents: 1000, credited_cents: 500 });

    const pdf = await page.request.get(`/api/credit-notes/${notes[0]!.id}/pdf`);
    expect(pdf.status()).toBe(200);
    const text = pdfText(await pdf.body(), { flat: true });
    expect(text).toContain(notes[0]!.number);
    expect(text).toContain(`The credit reduces what is owed on invoice ${invoice.number}`);
    expect(text).not.toMatch(/paid back|refund/i);
    await context.close();
  });
});
