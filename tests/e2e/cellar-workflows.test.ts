import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  createAuditEntry,
  createBatch,
  createFermenter,
  createKeg,
  createKegCheckout,
  createSanitationCycle,
  createUser,
  DAY,
  fillKeg,
  HOUR,
} from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, desktop, phone, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { readingsOn } from '../helpers/cellar.ts';

// Work finishes where it starts: a transfer from Today, the batch page or the fermenter opens with the
// batch chosen; a returned keg can be undone from the message that follows; the audit trail has a screen.

let ctx: TestContext, server: Served, browser: Browser;
let brewer: ApiClient;

const made = {
  batch: { id: '', name: 'Harvest pale ale' },
  fermenter: { id: '', code: '' },
  kegs: [] as { id: string; code: string }[],
  returned: { id: '', code: '' },
  auditor: { id: '', name: 'Vesna Quill' },
};

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const at = (ms: number) => new Date(now + ms);
  brewer = await ctx.signIn('brewer@example.org');
  const fermenter = await createFermenter(ctx.db, { capacityLiters: 30 });
  made.fermenter = { id: fermenter.id, code: fermenter.code };
  // Finished (the same gravity for three days), its fermenter booking ending in two days: a transfer is due.
  const batch = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: made.batch.name,
    style: 'Pale ale',
    volumeLiters: 21,
    readings: readingsOn(at, [-10, 1.05], [-4, 1.011], [-1, 1.011]),
    fermenter: { equipmentId: fermenter.id, startsAt: at(-10 * DAY - HOUR), endsAt: at(2 * DAY), now: at(0) },
  });
  made.batch.id = batch.id;
  for (let i = 0; i < 1; i++) {
    const keg = await createKeg(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: keg.id, readyAt: at(-2 * HOUR) });
    made.kegs.push({ id: keg.id, code: keg.code });
  }
  // A keg out with a member, 18 L of their beer in it.
  const out = await createKeg(ctx.db);
  await fillKeg(ctx.db, { kegId: out.id, at: at(-5 * DAY), ownerId: fixtureUserId('member') });
  await createKegCheckout(ctx.db, {
    kegId: out.id,
    memberId: fixtureUserId('member'),
    at: at(-2 * DAY),
    dueAt: at(10 * DAY),
    actorId: fixtureUserId('brewer'),
  });
  made.returned = { id: out.id, code: out.code };
  // Someone's changes in the trail: six days of equipment changes and one invoice change with before and after.
  const auditor = await createUser(ctx.db, { name: made.auditor.name, roles: ['brewer_on_duty'] });
  made.auditor.id = auditor.id;
  for (let d = 6; d >= 1; d--) {
    await createAuditEntry(ctx.db, {
      at: at(-d * DAY),
      actorId: auditor.id,
      action: 'state_changed',
      subjectType: 'Equipment',
      subjectId: fermenter.id,
      detail: { code: fermenter.code, from: 'ready', to: d % 2 ? 'holding' : 'needs_cleaning' },
    });
  }
  await createAuditEntry(ctx.db, {
    at: at(-HOUR),
    actorId: auditor.id,
    action: 'updated',
    subjectType: 'Batch',
    subjectId: batch.id,
    detail: { before: { volumeLiters: 20 }, after: { volumeLiters: 21 } },
  });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

/** The transfer form is open with the batch chosen. */
async function formHasBatch(page: Page) {
  await page.getByRole('heading', { name: 'Transfer to kegs' }).waitFor();
  await expect.poll(() => page.getByLabel('Batch and its fermenter').inputValue()).toBe(made.batch.id);
}

describe('a transfer starts where the work is', { timeout: 120_000 }, () => {
  it('opens with the batch chosen from the batch page and from the fermenter', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: desktop });
    await page.goto(`/batches/${made.batch.id}`);
    await page.getByRole('heading', { name: made.batch.name }).first().waitFor();
    await page.getByRole('link', { name: 'Transfer to kegs' }).click();
    await formHasBatch(page);

    await page.goto(`/cellar/${made.fermenter.id}`);
    await page.getByRole('link', { name: `Transfer ${made.batch.name} to kegs` }).click();
    await formHasBatch(page);
    await context.close();
  });

  it('opens from Today’s transfers due on a phone, and the transfer is recorded', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await page.goto('/');
    const due = page.getByRole('region', { name: 'Transfers due' });
    await due.getByText(made.batch.name).waitFor();
    await screenshot(page, 'today-transfers-due-phone');
    await due.getByRole('link', { name: `Transfer ${made.batch.name} to kegs` }).click();
    await formHasBatch(page);
    // No gravity warning: the batch is finished.
    expect(await page.getByText('Gravity not stable yet').count()).toBe(0);
    await page.getByRole('checkbox', { name: new RegExp(made.kegs[0]!.code) }).check();
    await page.getByLabel(/Drawn from the fermenter/).fill('19');
    for (const box of await page.locator('section[aria-labelledby="checklist-title"] input[type=checkbox]').all()) await box.check();
    await screenshot(page, 'transfer-from-today-phone');
    await page.getByRole('button', { name: 'Record the transfer' }).click();
    await page.getByRole('heading', { name: 'Transfer recorded' }).waitFor();
    const t = await ctx.db.selectFrom('transfer').select(['from_equipment_id']).where('batch_id', '=', made.batch.id).executeTakeFirstOrThrow();
    expect(t.from_equipment_id).toBe(made.fermenter.id);
    const width = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(width).toBeLessThanOrEqual(phone.width);
    await context.close();
  });
});

describe('a keg action can be undone from its message', { timeout: 120_000 }, () => {
  it('returns a keg, then undoes it: the keg is back with the member and its beer', async () => {
    const kegNow = async () => (await brewer.get(`/api/kegs/${made.returned.id}`)).body.keg;
    const before = await kegNow();
    expect(before).toMatchObject({ whereabouts: 'with_member', contents: { volumeLiters: 18 } });
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await page.goto(`/kegs/${made.returned.id}`);
    await page.getByRole('heading', { name: made.returned.code }).first().waitFor();
    await page.getByRole('button', { name: /^Returned/ }).click();
    const dialog = page.getByRole('dialog', { name: `Record ${made.returned.code} as returned?` });
    await dialog.getByText('You can undo it for 10 minutes', { exact: false }).waitFor();
    await dialog.getByRole('button', { name: 'Record it returned' }).click();
    await dialog.waitFor({ state: 'hidden' });
    const message = page.getByRole('status').filter({ hasText: 'recorded as returned' });
    await message.waitFor();
    await expect.poll(async () => (await kegNow()).whereabouts).toBe('cellar');
    await screenshot(page, 'keg-returned-undo-phone');
    await message.getByRole('button', { name: 'Undo' }).click();
    await page.getByRole('status').filter({ hasText: 'Undone' }).waitFor();
    const after = await kegNow();
    expect(after).toMatchObject({
      state: 'holding',
      whereabouts: 'with_member',
      member: { id: fixtureUserId('member') },
      dueAt: before.dueAt,
      contents: { fillId: before.contents.fillId, remainingLiters: before.contents.remainingLiters },
    });
    // The Undo button is gone with the message it belonged to.
    expect(await page.getByRole('button', { name: 'Undo' }).count()).toBe(0);
    await screenshot(page, 'keg-undone-phone');
    await context.close();
  });
});

describe('the audit trail screen', { timeout: 120_000 }, () => {
  it('is linked from Settings and the admin’s navigation, filters by person with the state in the URL, pages, and shows before and after', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'admin@example.org', { viewport: desktop });
    await page.goto('/settings');
    await page.getByRole('link', { name: 'audit trail', exact: true }).click();
    await page.getByRole('heading', { name: 'Audit trail' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/audit');
    await page.getByRole('link', { name: 'Audit trail', exact: true }).first().waitFor();

    await page.getByLabel('Person').selectOption(made.auditor.id);
    await expect.poll(() => new URL(page.url()).searchParams.get('actorId')).toBe(made.auditor.id);
    await page.getByText('1–7 of 7 changes').waitFor();
    const rows = page.locator('tbody tr');
    // Newest first: the batch's volume, with its before and after.
    await expect.poll(() => rows.first().textContent()).toMatch(/updated.*Batch.*volume liters: 20 → 21/);
    expect(await rows.first().getByRole('link').getAttribute('href')).toBe(`/batches/${made.batch.id}`);
    await screenshot(page, 'audit-trail-desktop');

    await page.getByLabel('Record type').selectOption('Equipment');
    await page.getByText('1–6 of 6 changes').waitFor();
    await page.getByLabel('Per page').selectOption('25');
    await page.getByRole('columnheader', { name: /When/ }).getByRole('button').click();
    await expect.poll(() => new URL(page.url()).searchParams.get('order')).toBe('asc');
    await expect.poll(() => rows.first().textContent()).toMatch(/changed: ready → needs cleaning|changed: ready → needs_cleaning/);

    // The state survives a reload: it is all in the URL.
    await page.reload();
    await page.getByText('1–6 of 6 changes').waitFor();
    expect(await page.getByLabel('Record type').inputValue()).toBe('Equipment');
    expect(await page.getByLabel('Person').inputValue()).toBe(made.auditor.id);
    await context.close();
  });

  it('fits a phone, and a brewer finds no such screen', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'admin@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await page.goto(`/audit?actorId=${made.auditor.id}&pageSize=5`);
    await page.getByText('1–5 of 7 changes').waitFor();
    await page.getByRole('button', { name: 'Next' }).click();
    await page.getByText('6–7 of 7 changes').waitFor();
    expect(new URL(page.url()).searchParams.get('page')).toBe('2');
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await screenshot(page, 'audit-trail-phone');
    await context.close();

    const brewerPage = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: desktop });
    await brewerPage.page.goto('/audit');
    await brewerPage.page.getByRole('heading', { name: 'Not for your role' }).waitFor();
    expect(await brewerPage.page.locator('tbody tr').count()).toBe(0);
    await brewerPage.context.close();
  });
});
