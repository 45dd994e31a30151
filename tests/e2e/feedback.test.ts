import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createInvoice, createInvoicePayment, DAY, type InvoiceWithLines } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { nextPeriod, periodBounds } from '../../shared/billing/dates.ts';
import { closeAll, phone, screenshot, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

// Every action says how it went, once: a success notice after a payment, a credit note, a role change
// and the first reading (which starts fermentation), gone once it is stale (another page, the next
// action); Settings never says "saved" beside a validation error; a list that fails to load says so
// with a Retry and never claims to be empty.

let ctx: TestContext, server: Served, browser: Browser;

const made = {
  /** Caspian Reyes (member4): unpaid, for a payment recorded by hand. */
  toPay: null as InvoiceWithLines | null,
  /** Bram Whitlock (member6): part paid, for a credit note. */
  toCredit: null as InvoiceWithLines | null,
  /** A planned batch of Maren Holloway's, no readings yet. */
  plannedId: '',
};

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now();
  const period = nextPeriod(now.toISOString().slice(0, 7), -1);
  const issue = (member: string) =>
    createInvoice(ctx.db, { memberId: fixtureUserId(member), period, today: periodBounds(period).next, actorId: fixtureUserId('treasurer') });
  made.toPay = await issue('member4');
  made.toCredit = await issue('member6');
  await createInvoicePayment(ctx.db, {
    invoiceId: made.toCredit.id,
    amountCents: 500,
    receivedOn: periodBounds(period).next,
    actorId: fixtureUserId('treasurer'),
  });
  const planned = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: 'Notice saison',
    style: 'Saison',
    status: 'planned',
    createdAt: new Date(now.getTime() - DAY),
  });
  made.plannedId = planned.id;
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const notice = (page: Page) => page.locator('main [data-notice]');

describe('feedback after actions', { timeout: 120_000 }, () => {
  it('the treasurer sees a payment recorded by hand and a credit note confirmed, and the notice goes once stale', async () => {
    await asSignedIn(browser, server.url, 'treasurer@example.org', async (page) => {
      const pay = made.toPay!;
      await page.goto(`/billing/invoices/${pay.id}`);
      await page.getByRole('heading', { name: pay.number! }).waitFor();
      await page.getByRole('button', { name: 'Record payment' }).click();
      const dialog = page.getByRole('dialog', { name: `Record a payment on ${pay.number}` });
      await dialog.getByLabel('Amount received').fill('5.00');
      await dialog.getByRole('button', { name: 'Record payment' }).click();
      await dialog.waitFor({ state: 'hidden' });
      await expect.poll(() => notice(page).textContent()).toMatch(/Payment recorded.*from Caspian Reyes.*still due/);
      expect(await notice(page).getAttribute('data-notice')).toBe('success');
      await screenshot(page, 'feedback-payment-recorded');
      // The next action makes it stale: opening and sending the payment dialog again replaces it.
      await page.getByRole('button', { name: 'Record payment' }).click();
      await dialog.getByRole('button', { name: 'Record payment' }).click();
      await dialog.waitFor({ state: 'hidden' });
      await expect.poll(() => notice(page).textContent()).toMatch(/Payment recorded.*is paid\./);
      expect(await notice(page).count()).toBe(1);
      // Another page: gone.
      await page.getByRole('link', { name: '← Invoices' }).click();
      await page.waitForURL('**/billing/invoices');
      await page.getByRole('heading', { name: 'Billing', exact: true }).waitFor();
      await expect.poll(() => notice(page).count()).toBe(0);

      const credit = made.toCredit!;
      await page.goto(`/billing/invoices/${credit.id}`);
      await page.getByRole('heading', { name: credit.number! }).waitFor();
      await page.getByRole('button', { name: 'Credit or refund' }).click();
      const refund = page.getByRole('dialog', { name: `Credit or refund part of ${credit.number}` });
      await refund.getByLabel('Amount to credit, tax included').fill('2.00');
      await refund.getByLabel('Reason').fill('Away for a week');
      await refund.getByRole('button', { name: 'Issue the credit note' }).click();
      await refund.waitFor({ state: 'hidden' });
      const note = await ctx.db.selectFrom('credit_note').select('number').where('invoice_id', '=', credit.id).executeTakeFirstOrThrow();
      await expect.poll(() => notice(page).textContent()).toMatch(new RegExp(`Credit note ${note.number} issued`));
      // Dismissed by hand.
      await notice(page).getByRole('button', { name: 'Dismiss' }).click();
      expect(await notice(page).count()).toBe(0);
    });
  });

  it('the admin sees a role change confirmed, gone on the next page', async () => {
    await asSignedIn(browser, server.url, 'admin@example.org', async (page) => {
      await page.goto('/members');
      await page.getByRole('button', { name: 'Edit roles of Bram Whitlock' }).click();
      const dialog = page.getByRole('dialog', { name: 'Roles of Bram Whitlock' });
      await dialog.getByLabel('Brewer on duty').check();
      await dialog.getByRole('button', { name: 'Save roles' }).click();
      await dialog.waitFor({ state: 'hidden' });
      await expect.poll(() => notice(page).textContent()).toMatch(/Roles saved.*Bram Whitlock is now Member, Brewer on duty/);
      await page.getByRole('link', { name: 'Settings' }).click();
      await page.waitForURL('**/settings');
      await page.getByRole('heading', { name: 'Settings', exact: true }).waitFor();
      await expect.poll(() => notice(page).count()).toBe(0);
    });
  });

  it('Settings never shows "saved" beside a validation error, in every section that saves', async () => {
    await asSignedIn(browser, server.url, 'admin@example.org', async (page) => {
      await page.goto('/settings');
      const sections = [
        { form: 'Booking rules', field: 'Cleaning buffer (hours)', bad: '-4', save: 'Save booking rules', saved: /Booking rules saved/ },
        { form: 'Sanitation rules', field: 'Freshness window (days)', bad: '0', save: 'Save sanitation rules', saved: /Sanitation rules saved/ },
        { form: 'Carbonation defaults', field: 'Set and hold (days)', bad: '', save: 'Save carbonation defaults', saved: /Carbonation defaults saved/ },
      ];
      for (const s of sections) {
        const form = page.getByRole('form', { name: s.form });
        await form.getByRole('button', { name: s.save }).click();
        await form.getByText(s.saved).waitFor();
        await form.getByLabel(s.field).fill(s.bad);
        // Changing a field already makes "saved" stale; saving the bad value shows only the error.
        expect(await form.getByText(s.saved).count()).toBe(0);
        await form.getByRole('button', { name: s.save }).click();
        await expect.poll(() => form.locator('[aria-invalid="true"]').count()).toBeGreaterThan(0);
        expect(await form.getByText(s.saved).count()).toBe(0);
      }
      await screenshot(page, 'feedback-settings-invalid');
    });
  });

  it('a list that fails shows the error with Retry, not the empty text, and Retry loads it', async () => {
    await asSignedIn(browser, server.url, 'member@example.org', { viewport: phone }, async (page) => {
      await page.route('**/api/batches?**', (route) =>
        route.fulfill({
          status: 503,
          contentType: 'application/problem+json',
          body: JSON.stringify({ type: 'about:blank', title: 'Service unavailable', status: 503, detail: 'The database is busy.' }),
        }),
      );
      await page.goto('/batches');
      const error = page.getByRole('alert').filter({ hasText: 'could not be loaded' });
      await error.waitFor({ timeout: 20_000 });
      expect(await page.getByText('No batches yet').count()).toBe(0);
      expect(await page.getByText(/^No batches/).count()).toBe(0);
      await screenshot(page, 'feedback-list-failed');
      await page.unroute('**/api/batches?**');
      await error.getByRole('button', { name: 'Retry' }).click();
      await page.getByRole('link', { name: 'Notice saison' }).waitFor();
      expect(await page.getByText('could not be loaded').count()).toBe(0);
    });
  });

  it('the first reading says the batch is now fermenting', async () => {
    await asSignedIn(browser, server.url, 'member@example.org', async (page) => {
      await page.goto(`/batches/${made.plannedId}`);
      await page.getByRole('button', { name: 'Add a reading' }).click();
      const dialog = page.getByRole('dialog');
      await dialog.getByLabel('Gravity').fill('1.052');
      await dialog.getByRole('button', { name: 'Add the reading' }).click();
      await dialog.waitFor({ state: 'hidden' });
      await expect.poll(() => notice(page).textContent()).toMatch(/Notice saison is now Fermenting/);
      const row = await ctx.db.selectFrom('batch').select('status').where('id', '=', made.plannedId).executeTakeFirstOrThrow();
      expect(row.status).toBe('fermenting');
      await screenshot(page, 'feedback-first-reading');
    });
  });
});
