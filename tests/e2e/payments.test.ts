import { sql } from 'kysely';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPaymentsFake, type PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import type { ProviderEvent } from '../../backend/modules/billing/payment-provider.ts';
import { handleProviderEvent } from '../../backend/modules/billing/payments.service.ts';
import { createBooking, createInvoice, DAY, type InvoiceWithLines } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { nextPeriod, periodBounds, periodLabel } from '../../shared/billing/dates.ts';
import { closeAll, desktop, launchBrowser, phone, screenshot, serve, signedInPage } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

// A member pays an overdue invoice online: from My invoices, to the payment provider's page (the
// local fake), back to the app, which shows it paid. Then the treasurer's Billing screens.

let ctx: TestContext;
let fake: PaymentsFake;
let server: Awaited<ReturnType<typeof serve>>;
let browser: Browser;

// The invoices the tests pay and list, made in beforeAll as invoice runs would have made them, on the
// first day after each period, for the three months before the server's current one.
const made = {
  /** The month that ended last (the one the overview offers to bill). */
  lastPeriod: '',
  /** Caspian Reyes (member4): dues for the two months before it, both invoices unpaid and past due. */
  payer: { email: 'member4@example.org', invoices: [] as InvoiceWithLines[] },
  /** Bram Whitlock (member6): one unpaid invoice. */
  canceller: { email: 'member6@example.org', invoice: null as InvoiceWithLines | null },
  /** Ines Farrow (member3): a fortnight in the 60 L fermenter on top of her dues, the largest amount to pay. */
  largest: null as InvoiceWithLines | null,
};

beforeAll(async () => {
  fake = await startPaymentsFake({ webhookRetries: 0 });
  ctx = await createTestContext({ PAYMENTS_FAKE_PORT: String(fake.port) });
  const today = ctx.clock.now().toISOString().slice(0, 10);
  made.lastPeriod = nextPeriod(today.slice(0, 7), -1);
  const older = nextPeriod(made.lastPeriod, -2);
  const old = nextPeriod(made.lastPeriod, -1);
  const issue = (member: string, period: string) =>
    createInvoice(ctx.db, { memberId: fixtureUserId(member), period, today: periodBounds(period).next, actorId: fixtureUserId('treasurer') });

  made.payer.invoices = [await issue('member4', older), await issue('member4', old)];
  made.canceller.invoice = await issue('member6', old);
  const start = new Date(`${periodBounds(old).first}T10:00:00Z`).getTime() + 4 * DAY;
  await createBooking(ctx.db, {
    equipmentId: fixtureEquipmentId('F-03'),
    ownerId: fixtureUserId('member3'),
    startsAt: new Date(start),
    endsAt: new Date(start + 14 * DAY),
    now: ctx.clock.now(),
  });
  made.largest = await issue('member3', old);
  server = await serve(ctx);
  fake.webhookUrl = `${server.url}/api/webhooks/payments`;
  browser = await launchBrowser();
});
afterAll(() => closeAll(browser, server, fake, ctx));

const signIn = (email: string, viewport = desktop) => signedInPage(browser, server.url, email, { viewport, context: { locale: 'en-GB' } });

describe('paying an invoice online', { timeout: 120_000 }, () => {
  it('a member opens an unpaid invoice, pays on the provider’s page, returns and sees it paid', async () => {
    const member = await ctx.db.selectFrom('app_user').select(['id', 'name']).where('email', '=', made.payer.email).executeTakeFirstOrThrow();
    const unpaid = await ctx.db
      .selectFrom('invoice')
      .select(['id', 'number', 'total_cents'])
      .where('member_id', '=', member.id)
      .where('status', '=', 'issued')
      .orderBy('issued_on')
      .execute();
    expect(unpaid.map((i) => i.id)).toEqual(made.payer.invoices.map((i) => i.id)); // both months unpaid, the older first
    const target = unpaid[0]!;

    const { page, context } = await signIn(made.payer.email);
    await page.getByRole('link', { name: 'Billing', exact: true }).click();
    await page.waitForURL('**/billing/my-invoices');
    await expect.poll(() => page.getByTestId('balance').textContent()).toMatch(/€\d/);
    await page
      .getByRole('row', { name: new RegExp(target.number!) })
      .getByText('Overdue')
      .waitFor();
    await screenshot(page, 'billing-member-my-invoices');

    await page.getByRole('link', { name: target.number! }).click();
    await page.waitForURL(`**/billing/my-invoices/${target.id}`);
    await page.getByRole('heading', { name: new RegExp(target.number!) }).waitFor();
    await page.getByText('Membership dues').first().waitFor();
    await screenshot(page, 'billing-member-invoice-unpaid');

    await page.getByRole('button', { name: /^Pay .* online$/ }).click();
    await page.waitForURL((u) => u.href.startsWith(`${fake.url}/pay/`));
    await page.getByText('Sandbox payment page').waitFor();
    expect(await page.getByTestId('amount').textContent()).toBe(
      new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'EUR' }).format(target.total_cents / 100),
    );
    await screenshot(page, 'billing-provider-checkout-page');

    await page.getByRole('button', { name: /^Pay / }).click();
    await page.waitForURL((u) => u.href.startsWith(`${server.url}/billing/my-invoices/${target.id}`) && u.searchParams.get('checkout') === 'success');
    await page.getByText('Paid — thank you').waitFor();
    await page
      .getByRole('heading', { name: new RegExp(target.number!) })
      .getByText('Paid')
      .waitFor();
    await screenshot(page, 'billing-member-invoice-paid');

    const row = await ctx.db.selectFrom('invoice').select(['status', 'paid_cents']).where('id', '=', target.id).executeTakeFirstOrThrow();
    expect(row).toEqual({ status: 'paid', paid_cents: target.total_cents });
    const payment = await ctx.db.selectFrom('payment').select(['method', 'amount_cents']).where('invoice_id', '=', target.id).executeTakeFirstOrThrow();
    expect(payment).toEqual({ method: 'online', amount_cents: target.total_cents });

    // Back on the list, the paid invoice no longer shows as overdue and the balance went down.
    await page.getByRole('link', { name: '← My invoices' }).click();
    await page
      .getByRole('row', { name: new RegExp(target.number!) })
      .getByText('Paid')
      .waitFor();
    await context.close();
  });

  it('a member who cancels on the provider’s page comes back to an invoice still open', async () => {
    const invoice = made.canceller.invoice!;
    const { page, context } = await signIn(made.canceller.email, phone);
    await page.goto('/billing/my-invoices?unpaid=true');
    await page.getByRole('row').nth(1).getByRole('link', { name: invoice.number! }).click();
    await page.getByRole('button', { name: /^Pay .* online$/ }).click();
    await page.waitForURL((u) => u.href.startsWith(`${fake.url}/pay/`));
    await page.getByRole('button', { name: 'Cancel and go back' }).click();
    await page.getByText('You cancelled on the payment page; nothing was charged.').waitFor();
    await page.getByRole('button', { name: /^Pay .* online$/ }).waitFor(); // still open: it can be paid again
    await screenshot(page, 'billing-member-checkout-cancelled-phone');
    const row = await ctx.db.selectFrom('invoice').select(['status', 'paid_cents']).where('id', '=', invoice.id).executeTakeFirstOrThrow();
    expect(row).toEqual({ status: 'issued', paid_cents: 0 });
    expect(await ctx.db.selectFrom('payment').select('id').where('invoice_id', '=', invoice.id).execute()).toEqual([]);
    await context.close();
  });
});

describe('the treasurer’s billing screens', { timeout: 120_000 }, () => {
  it('shows the overview with ageing, the invoice list, an invoice with its sources, the run preview and the price list', async () => {
    const { page, context } = await signIn('treasurer@example.org');
    await page.getByRole('link', { name: 'Billing', exact: true }).click();
    await page.waitForURL('**/billing');
    await page.getByRole('heading', { name: 'Open amounts by age' }).waitFor();
    await page.getByText(`${periodLabel(made.lastPeriod)} has ended and can be billed.`).waitFor();
    await page.locator('.recharts-bar-rectangle').first().waitFor();
    await screenshot(page, 'billing-treasurer-overview');

    await page.getByRole('link', { name: 'Invoices', exact: true }).click();
    await page.getByRole('row').nth(1).waitFor();
    await page.getByLabel('Status').selectOption('issued');
    await page.waitForURL(/status=issued/);
    await page.getByRole('button', { name: /To pay/ }).click();
    await page.waitForURL(/sort=amountDue/);
    await screenshot(page, 'billing-treasurer-invoices');
    // Most to pay first: Ines Farrow's month with the fermenter.
    const largest = made.largest!;
    const top = await ctx.db
      .selectFrom('invoice')
      .select(['id', 'number'])
      .where('status', '=', 'issued')
      .orderBy(sql`total_cents - paid_cents - credited_cents`, 'desc')
      .executeTakeFirstOrThrow();
    expect(top.id).toBe(largest.id);
    await expect.poll(() => page.getByRole('row').nth(1).getByRole('link').first().textContent()).toBe(largest.number);
    await page.getByRole('row').nth(1).getByRole('link').first().click();
    await page.getByRole('heading', { name: largest.number! }).waitFor();
    await page.getByText(/F-03/).first().waitFor(); // its fermenter-days, with the booking they come from
    await page.getByRole('button', { name: 'Record payment' }).waitFor();
    await screenshot(page, 'billing-treasurer-invoice');

    await page.getByRole('link', { name: 'Run a period' }).click();
    await page.getByRole('heading', { name: /Preview: \d+ invoices to make/ }).waitFor();
    await page.getByRole('button', { name: /Run and issue \d+ invoices/ }).waitFor();
    await screenshot(page, 'billing-treasurer-run-preview');

    await page.getByRole('link', { name: 'Price list' }).click();
    await page.getByRole('heading', { name: /Prices, in EUR/ }).waitFor();
    await screenshot(page, 'billing-treasurer-price-list');
    await context.close();
  });

  it('keeps the brewer-on-duty out of Billing', async () => {
    const { page, context } = await signIn('brewer@example.org');
    expect(await page.getByRole('link', { name: 'Billing', exact: true }).count()).toBe(0);
    await page.goto('/billing');
    await page.getByRole('heading', { name: 'Not for your role' }).waitFor();
    await context.close();
  });
});

describe('an invoice paid twice online', { timeout: 120_000 }, () => {
  it('shows the treasurer the overpayment on the overview and on the invoice, until it is marked refunded', async () => {
    // Two provider sessions for the payer's other invoice, both paid (one had been replaced but was paid all the same).
    const invoice = made.payer.invoices[1]!;
    for (const n of [1, 2]) {
      const id = `cs_test_e2e_twice_${n}`;
      await ctx.db
        .insertInto('checkout_session')
        .values({
          id,
          invoice_id: invoice.id,
          amount_cents: invoice.total_cents,
          currency: invoice.currency,
          url: `${fake.url}/pay/${id}`,
          status: n === 1 ? 'expired' : 'open',
        })
        .execute();
      const session = {
        id,
        object: 'checkout.session',
        status: 'complete',
        payment_status: 'paid',
        amount_total: invoice.total_cents,
        currency: 'eur',
        payment_intent: `pi_test_e2e_${n}`,
      };
      const event = {
        id: `evt_test_e2e_twice_${n}`,
        object: 'event',
        type: 'checkout.session.completed',
        data: { object: session },
      } as unknown as ProviderEvent;
      expect((await handleProviderEvent(ctx.db, event, ctx.clock.now(), ctx.deps.queue)).outcome).toBe(n === 1 ? 'paid' : 'overpaid');
    }
    const { page, context } = await signIn('treasurer@example.org');
    await page.goto('/billing');
    const section = page.getByRole('region', { name: 'Overpayments to refund' });
    await section.getByRole('row', { name: new RegExp(invoice.number!) }).waitFor();
    await screenshot(page, 'billing-treasurer-overpayments');

    await section.getByRole('link', { name: invoice.number! }).click();
    await page.getByRole('heading', { name: invoice.number! }).waitFor();
    const euros = new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'EUR' }).format(invoice.total_cents / 100);
    expect(await page.getByTestId('overpayment').textContent()).toBe(`${euros} of it was more than was due: it is owed back to the member.`);
    await screenshot(page, 'billing-treasurer-invoice-overpaid');

    await page.goBack();
    await section
      .getByRole('row', { name: new RegExp(invoice.number!) })
      .getByRole('button', { name: 'Refunded' })
      .click();
    await section.waitFor({ state: 'detached' });
    const row = await ctx.db
      .selectFrom('payment')
      .select(['overpaid_cents', 'overpayment_refunded_on'])
      .where('invoice_id', '=', invoice.id)
      .where('overpaid_cents', '>', 0)
      .executeTakeFirstOrThrow();
    expect(row).toEqual({ overpaid_cents: invoice.total_cents, overpayment_refunded_on: expect.stringMatching(/^\d{4}-\d{2}-\d{2}$/) });
    await context.close();
  });
});
