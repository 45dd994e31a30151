import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createInvoice, createKeg, createKegCheckout, createMember, DAY } from '../../db/factories/index.ts';
import { closeAll, desktop, phone, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

// The "Remind" buttons (an overdue invoice, all overdue invoices, an overdue keg) and the private
// calendar link on the profile, driven as the treasurer, the brewer on duty and a member would.

let ctx: TestContext, server: Served, browser: Browser;
const shots = path.join('/tmp', 'cellarwright-reminders-calendar');
const made = { invoiceId: '', invoiceNumber: '', debtorEmail: '', kegId: '', kegCode: '', holderEmail: '', memberEmail: '' };

async function shot(page: Page, name: string) {
  fs.mkdirSync(shots, { recursive: true });
  await page.screenshot({ path: path.join(shots, `${name}.png`), fullPage: true });
}

/** The month before the one `day` falls in, as a billing period. */
const monthBefore = (day: string) => new Date(Date.UTC(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 2, 1)).toISOString().slice(0, 7);

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const issued = new Date(now - 70 * DAY).toISOString().slice(0, 10);
  for (const name of ['Olive Overdue', 'Otis Overdue']) {
    const debtor = await createMember(ctx.db, { name });
    const inv = await createInvoice(ctx.db, { memberId: debtor.id, period: monthBefore(issued), today: issued });
    if (!made.invoiceId) Object.assign(made, { invoiceId: inv.id, invoiceNumber: inv.number!, debtorEmail: debtor.email });
  }
  const holder = await createMember(ctx.db, { name: 'Hal Holder' });
  const keg = await createKeg(ctx.db);
  await createKegCheckout(ctx.db, { kegId: keg.id, memberId: holder.id, at: new Date(now - 20 * DAY), dueAt: new Date(now - 4 * DAY) });
  Object.assign(made, { kegId: keg.id, kegCode: keg.code, holderEmail: holder.email });
  made.memberEmail = (await createMember(ctx.db, { name: 'Cal Endar' })).email;
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const remindersOf = (column: 'invoice_id' | 'keg_id', id: string) =>
  ctx.db.selectFrom('reminder').select(['sent_to', 'sent_at']).where(column, '=', id).execute();

describe('remind buttons and the calendar link', { timeout: 120_000 }, () => {
  it('lets the treasurer remind one overdue invoice, then confirms how many the “all overdue” button sends', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'treasurer@example.org', { viewport: desktop });
    await page.goto(`/billing/invoices/${made.invoiceId}`);
    const remind = page.getByRole('button', { name: `Remind about ${made.invoiceNumber}` });
    await remind.click();
    await page.getByRole('status').getByText(`Reminder queued for ${made.debtorEmail}.`).waitFor();
    await page.getByText(/^Last reminded /).waitFor();
    expect(await remind.isDisabled()).toBe(true);
    expect(await remindersOf('invoice_id', made.invoiceId)).toHaveLength(1);
    await shot(page, 'invoice-reminded-desktop');

    await page.goto('/billing/invoices');
    const all = page.getByRole('button', { name: /^Remind all overdue \(\d+\)$/ });
    await all.waitFor();
    const n = Number(/\((\d+)\)/.exec((await all.textContent()) ?? '')![1]);
    expect(n).toBeGreaterThanOrEqual(1);
    await all.click();
    const dialog = page.getByRole('dialog', { name: `Send ${n} reminder${n === 1 ? '' : 's'}?` });
    await dialog.waitFor();
    await shot(page, 'remind-all-confirm-desktop');
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'hidden' });
    const counted = async () =>
      (
        await ctx.db
          .selectFrom('reminder')
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .executeTakeFirstOrThrow()
      ).n;
    expect(Number(await counted())).toBe(1);
    await all.click();
    await dialog.getByRole('button', { name: /^Send \d+ reminders?$/ }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByText(new RegExp(`^${n} reminders? queued`)).waitFor();
    expect(Number(await counted())).toBe(1 + n);
    await ctx.waitForMail(made.debtorEmail, /^Reminder: invoice/);
    await context.close();
  });

  it('lets the brewer on duty remind the holder of an overdue keg from the phone list', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await page.goto('/kegs/overdue');
    const remind = page.getByRole('button', { name: `Remind about ${made.kegCode}` });
    await remind.click();
    await page.getByRole('status').getByText(`Reminder queued for ${made.holderEmail}.`).waitFor();
    expect(await remind.isDisabled()).toBe(true);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await shot(page, 'overdue-kegs-reminded-phone');
    expect(await remindersOf('keg_id', made.kegId)).toHaveLength(1);
    await page.goto(`/kegs/${made.kegId}`);
    await page.getByText(/^Last reminded /).waitFor();
    await ctx.waitForMail(made.holderEmail, /^Reminder: keg/);
    await context.close();
  });

  it('shows a member their calendar link on the profile, copies it, and a new link revokes the old one', async () => {
    for (const [viewport, name] of [
      [phone, 'phone'],
      [desktop, 'desktop'],
    ] as const) {
      const { page, context } = await signedInPage(browser, server.url, made.memberEmail, {
        viewport,
        context: { permissions: ['clipboard-read', 'clipboard-write'] },
      });
      await page.goto('/profile');
      const panel = page.getByRole('region', { name: 'My calendar' });
      if (name === 'phone') await panel.getByRole('button', { name: 'Make a link' }).click();
      const link = panel.getByRole('textbox', { name: /Subscription link/ });
      await link.waitFor();
      const first = await link.inputValue();
      expect(first).toMatch(new RegExp(`^${server.url}/ical/[A-Za-z0-9_-]+\\.ics$`));
      await panel.getByRole('button', { name: 'Copy link' }).click();
      await panel.getByRole('status').getByText('Copied.').waitFor();
      expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(first);
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
      await shot(page, `profile-calendar-${name}`);
      const feed = await fetch(first);
      expect(feed.status).toBe(200);
      expect(feed.headers.get('content-type')).toMatch(/^text\/calendar/);

      await panel.getByRole('button', { name: 'New link' }).click();
      const dialog = page.getByRole('dialog', { name: 'Make a new link?' });
      await dialog.getByRole('button', { name: 'Make a new link' }).click();
      await dialog.waitFor({ state: 'hidden' });
      await expect.poll(() => link.inputValue()).not.toBe(first);
      const second = await link.inputValue();
      expect((await fetch(first)).status).toBe(404);
      expect((await fetch(second)).status).toBe(200);
      await context.close();
    }
  });
});
