import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, phone, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { bookFixture } from '../helpers/cellar.ts';

let ctx: TestContext, server: Served, browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now();
  // This month on the calendar: F-01 in use by Maren Holloway (member@), F-02 booked by Ines Farrow
  // (member3@) from the day after tomorrow; F-03 free for weeks. K-001 freshly sanitized (ready), the
  // other kegs still needing cleaning.
  await bookFixture(ctx, 'F-01', 'member', -3, 10, { notes: 'Amber ale' });
  await bookFixture(ctx, 'F-02', 'member3', 2, 16);
  await createSanitationCycle(ctx.db, {
    equipmentId: fixtureEquipmentId('K-001'),
    readyAt: new Date(now.getTime() - HOUR),
    recordedBy: fixtureUserId('brewer'),
  });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const signIn = (email: string) => signedInPage(browser, server.url, email);

/** Clicks the calendar cell of an item's row on a day (month view), moving to the day's month first. */
async function clickDay(page: Page, rowLabel: string, day: string) {
  const header = page.locator(`.ec-col-head time[datetime="${day}"]`);
  for (let i = 0; i < 3 && (await header.count()) === 0; i++) await page.locator('button.ec-next').click();
  const col = await header.boundingBox();
  const row = await page.getByText(rowLabel, { exact: true }).boundingBox();
  if (!col || !row) throw new Error(`no cell for ${rowLabel} on ${day}`);
  await page.mouse.click(col.x + col.width / 2, row.y + row.height / 2);
}

describe('booking a fermenter on the calendar', () => {
  it('a member picks a free fermenter, books it, sees it in My bookings and cancels it', async () => {
    const { page, context } = await signIn('member@example.org');
    await page.getByRole('link', { name: 'Bookings' }).click();
    await page.waitForURL('**/bookings');
    const row = 'F-03 · 60 L fermenter 1';
    await page.getByText(row).waitFor();
    // Let the bookings of the visible month load before looking for a free day.
    await page.locator('.ec-event').first().waitFor();

    const member = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    const f03 = await ctx.db.selectFrom('equipment').select('id').where('code', '=', 'F-03').executeTakeFirstOrThrow();
    // A week from the server's now F-03 is free (nothing booked on it).
    const day = new Date(ctx.clock.now().getTime() + 7 * DAY).toISOString().slice(0, 10);
    const clash = await ctx.db
      .selectFrom('booking')
      .select('id')
      .where('equipment_id', '=', f03.id)
      .where('state', '<>', 'cancelled')
      .where('blocked_until', '>', new Date(`${day}T00:00:00Z`))
      .where('starts_at', '<', new Date(new Date(`${day}T00:00:00Z`).getTime() + 16 * 24 * 3600_000))
      .execute();
    expect(clash).toEqual([]);

    await screenshot(page, 'bookings-calendar');
    await clickDay(page, row, day);

    const dialog = page.getByRole('dialog', { name: 'Book equipment' });
    await dialog.waitFor();
    await expect.poll(() => dialog.getByLabel('Item').inputValue()).toBe(f03.id);
    expect(await dialog.getByLabel('From').inputValue()).toBe(`${day}T10:00`);
    await dialog.getByLabel('Notes').fill('Oatmeal stout');
    await dialog.getByRole('button', { name: 'Book', exact: true }).click();
    await page.getByText(/F-03 is yours from/).waitFor();
    // The new booking shows on the calendar, in copper: "Yours".
    await page.locator('.cw-booking-mine').filter({ hasText: 'Yours' }).first().waitFor();
    await screenshot(page, 'bookings-calendar-booked');

    const made = await ctx.db
      .selectFrom('booking')
      .selectAll()
      .where('equipment_id', '=', f03.id)
      .where('owner_id', '=', member.id)
      .where('state', '=', 'booked')
      .executeTakeFirstOrThrow();
    expect(made.starts_at.toISOString()).toBe(`${day}T10:00:00.000Z`);
    expect(made.notes).toBe('Oatmeal stout');

    await page.getByRole('button', { name: 'Week' }).click();
    await page.locator('.ec-title').filter({ hasText: /\d/ }).waitFor();
    await screenshot(page, 'bookings-calendar-week');

    await page.getByRole('navigation', { name: 'Bookings sections' }).getByRole('link', { name: 'My bookings' }).click();
    await page.waitForURL('**/bookings/mine');
    const line = page.locator(`tr[data-booking="${made.id}"]`);
    await line.waitFor();
    expect(await line.innerText()).toMatch(/F-03[\s\S]*Booked/);
    await screenshot(page, 'bookings-mine');
    await line.getByRole('button', { name: /^Cancel F-03/ }).click();
    const confirm = page.getByRole('dialog', { name: 'Cancel this booking?' });
    await confirm.getByRole('button', { name: 'Cancel booking' }).click();
    await page.getByText(/Cancelled F-03 from .* The slot is free again\./).waitFor();
    await expect.poll(() => line.innerText()).toMatch(/Cancelled/);

    const after = await ctx.db.selectFrom('booking').select(['state', 'cancelled_by']).where('id', '=', made.id).executeTakeFirstOrThrow();
    expect(after).toEqual({ state: 'cancelled', cancelled_by: member.id });
    await context.close();
  }, 90_000);

  it('shows the brewer on duty every booking with its owner', async () => {
    const { page, context } = await signIn('brewer@example.org');
    await page.goto('/bookings');
    await page.getByText('F-01 · 30 L bucket fermenter 1').waitFor();
    // F-01 is held by Maren Holloway, F-02 by Ines Farrow: the brewer sees the names, not "Taken".
    await page.locator('.cw-booking').filter({ hasText: 'Maren Holloway' }).first().waitFor();
    await page.locator('.cw-booking').filter({ hasText: 'Ines Farrow' }).first().waitFor();
    expect(
      await page
        .locator('.cw-booking')
        .filter({ hasText: /^Taken/ })
        .count(),
    ).toBe(0);
    await screenshot(page, 'bookings-calendar-brewer');
    await page.getByRole('link', { name: 'All bookings' }).click();
    await page.getByRole('cell', { name: 'Maren Holloway' }).first().waitFor();
    await page.getByRole('cell', { name: 'Ines Farrow' }).first().waitFor();
    await context.close();
  });

  it("lists the cellar with server-side filters, opens an item's page, and lets the admin change the booking rules", async () => {
    const { page, context } = await signIn('admin@example.org');
    await page.getByRole('link', { name: 'Cellar', exact: true }).click();
    await page.getByRole('cell', { name: 'F-01', exact: true }).waitFor();
    await page.getByLabel('Kind').selectOption('keg');
    await page.getByLabel('State').selectOption('needs_cleaning');
    await page.waitForURL(/kind=keg/);
    await expect.poll(async () => (await page.locator('tbody tr').allInnerTexts()).every((t) => /Needs cleaning/.test(t))).toBe(true);
    const first = page.locator('tbody tr').first();
    const code = (await first.locator('a').first().innerText()).trim();
    // K-001 was sanitized and is ready, so the first keg needing cleaning is K-002.
    expect(code).toBe('K-002');
    await first.getByRole('checkbox').check();
    await expect.poll(() => page.getByRole('link', { name: /Print 1 label/ }).getAttribute('href')).toMatch(/labels\.pdf\?ids=/);
    await screenshot(page, 'cellar-kegs-needing-cleaning');
    await first.locator('a').first().click();
    await page.getByRole('heading', { name: new RegExp(code) }).waitFor();
    await page.getByRole('heading', { name: 'History' }).waitFor();
    await page
      .getByText(/rated pressure/)
      .first()
      .waitFor(); // the keg's safety caution
    await screenshot(page, 'cellar-keg-page');

    await page.getByRole('link', { name: 'Settings', exact: true }).click();
    const buffer = page.getByLabel('Cleaning buffer (hours)');
    await buffer.fill('36');
    await page.getByRole('button', { name: 'Save booking rules' }).click();
    await page.getByText('Booking rules saved.').waitFor();
    await screenshot(page, 'settings-booking-rules');
    const saved = await ctx.db.selectFrom('setting').select('value').where('key', '=', 'booking_rules').executeTakeFirstOrThrow();
    expect((saved.value as { cleaningBufferHours: number }).cleaningBufferHours).toBe(36);
    await context.close();
  }, 90_000);
});

describe('the booking calendar on a phone', { timeout: 120_000 }, () => {
  it('shows the week as a list of items, says "tap", and books an item from its first free time', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'member@example.org', { viewport: phone });
    try {
      await page.goto('/bookings');
      const agenda = page.getByTestId('booking-agenda');
      await agenda.waitFor();
      // A week list, not the squeezed timeline; help that speaks of tapping.
      expect(await page.locator('.ec').count()).toBe(0);
      await page.getByText(/^Tap Book on an item/).waitFor();
      expect(await page.getByText(/Click a free day/).count()).toBe(0);
      // F-01 is Maren's and in use, F-02 is Ines Farrow's from the day after tomorrow (this week), F-04 is free.
      const card = (code: string) => agenda.locator(`li[data-agenda-item="${code}"]`);
      await card('F-01').locator('.cw-booking-mine').filter({ hasText: 'Yours · in use' }).waitFor();
      await card('F-02')
        .locator('.cw-booking-taken')
        .filter({ hasText: /^Taken/ })
        .waitFor();
      expect(await card('F-02').innerText()).not.toContain('Ines Farrow');
      await card('F-04').getByText('Free all week').waitFor();
      await screenshot(page, 'bookings-agenda-phone');

      await card('F-04').getByRole('button', { name: 'Book F-04 · 120 L conical 1' }).click();
      const dialog = page.getByRole('dialog', { name: 'Book equipment' });
      await dialog.waitFor();
      const f04 = fixtureEquipmentId('F-04');
      await expect.poll(() => dialog.getByLabel('Item').inputValue()).toBe(f04);
      // Free now: the booking starts at the next whole hour at least five minutes away (the server's now).
      const now = ctx.clock.now().getTime();
      const from = new Date(Math.ceil((now + 5 * 60_000) / HOUR) * HOUR).toISOString().slice(0, 16);
      expect(await dialog.getByLabel('From').inputValue()).toBe(from);
      await screenshot(page, 'bookings-agenda-phone-dialog');
      await dialog.getByRole('button', { name: 'Book', exact: true }).click();
      await page.getByText(/F-04 is yours from/).waitFor();
      await card('F-04').locator('.cw-booking-mine').filter({ hasText: 'Yours' }).waitFor();
      const made = await ctx.db
        .selectFrom('booking')
        .select(['starts_at', 'owner_id'])
        .where('equipment_id', '=', f04)
        .where('state', '<>', 'cancelled')
        .execute();
      expect(made).toEqual([{ starts_at: new Date(`${from}:00Z`), owner_id: fixtureUserId('member') }]);

      // The next week, and back.
      const title = await agenda.getByRole('heading', { level: 2 }).innerText();
      await agenda.getByRole('button', { name: 'Next week' }).click();
      await expect.poll(() => agenda.getByRole('heading', { level: 2 }).innerText()).not.toBe(title);
      await card('F-01').locator('.cw-booking-mine').first().waitFor(); // F-01 is held into next week too
      await agenda.getByRole('button', { name: 'Back to this week' }).click();
      await expect.poll(() => agenda.getByRole('heading', { level: 2 }).innerText()).toBe(title);
      await screenshot(page, 'bookings-agenda-phone-booked');
    } finally {
      await context.close();
    }
  });

  it('keeps the timeline and says "click" on a desktop', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'member@example.org');
    try {
      await page.goto('/bookings');
      await page.locator('.ec').waitFor();
      await page.getByText(/^Click a free day/).waitFor();
      expect(await page.getByTestId('booking-agenda').count()).toBe(0);
    } finally {
      await context.close();
    }
  });
});
