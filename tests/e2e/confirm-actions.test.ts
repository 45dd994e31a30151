import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createKegCheckout, DAY, fillKeg } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { nextPeriod, periodLabel } from '../../shared/billing/dates.ts';
import { formatMoney } from '../../shared/billing/money.ts';
import { closeAll, desktop, phone, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { readingsOn } from '../helpers/cellar.ts';

// Actions that end something for good (a keg returned, emptied or dumped; a batch discarded; a period's
// invoices issued) ask first and say what they will change: cancel leaves everything as it was.

let ctx: TestContext, server: Served, browser: Browser;
let brewer: ApiClient;
let treasurer: ApiClient;

const made = {
  /** Out with Caspian Reyes (member4), 16 L of its 18 L left, with a set-and-hold carbonation plan. */
  returned: { id: fixtureEquipmentId('K-002'), code: 'K-002', batchName: '' },
  /** In the cold room on tap T-2. */
  emptied: { id: fixtureEquipmentId('K-003'), code: 'K-003', batchName: '' },
  /** In the cellar, full. */
  dumped: { id: fixtureEquipmentId('K-012'), code: 'K-012', batchName: '' },
  /** Fermenting, owned by the member. */
  batch: { id: '', name: 'Sour experiment' },
  /** The month that ended last: the fixture's dues bill every member for it. */
  period: '',
};

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const at = (ms: number) => new Date(now + ms);
  [brewer, treasurer] = await Promise.all([ctx.signIn('brewer@example.org'), ctx.signIn('treasurer@example.org')]);

  const returned = await fillKeg(ctx.db, { kegId: made.returned.id, at: at(-6 * DAY), ownerId: fixtureUserId('member4'), volumeLiters: 18 });
  const plan = await brewer.post('/api/carbonation-plans', { kegId: made.returned.id, targetVolumes: 2.4, method: 'set_and_hold' });
  if (plan.status !== 201) throw new Error(`could not plan carbonation: ${plan.status} ${JSON.stringify(plan.body)}`);
  const level = await brewer.patch(`/api/kegs/${made.returned.id}/level`, { remainingLiters: 16 });
  if (level.status !== 200) throw new Error(`could not note the level: ${level.status} ${JSON.stringify(level.body)}`);
  await createKegCheckout(ctx.db, {
    kegId: made.returned.id,
    memberId: fixtureUserId('member4'),
    at: at(-2 * DAY),
    dueAt: at(12 * DAY),
    actorId: fixtureUserId('brewer'),
  });
  made.returned.batchName = (await ctx.db.selectFrom('batch').select('name').where('id', '=', returned.batchId).executeTakeFirstOrThrow()).name;

  const emptied = await fillKeg(ctx.db, { kegId: made.emptied.id, at: at(-4 * DAY), whereabouts: 'cold_room' });
  const tapped = await brewer.post(`/api/kegs/${made.emptied.id}/move`, { to: 'cold_room', tapId: fixtureEquipmentId('T-2') });
  if (tapped.status !== 200) throw new Error(`could not tap: ${tapped.status} ${JSON.stringify(tapped.body)}`);
  made.emptied.batchName = (await ctx.db.selectFrom('batch').select('name').where('id', '=', emptied.batchId).executeTakeFirstOrThrow()).name;

  const dumped = await fillKeg(ctx.db, { kegId: made.dumped.id, at: at(-3 * DAY) });
  made.dumped.batchName = (await ctx.db.selectFrom('batch').select('name').where('id', '=', dumped.batchId).executeTakeFirstOrThrow()).name;

  const batch = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: made.batch.name,
    volumeLiters: 20,
    readings: readingsOn(at, [-5, 1.05], [-1, 1.02]),
  });
  made.batch.id = batch.id;
  made.period = nextPeriod(ctx.clock.now().toISOString().slice(0, 7), -1);

  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const kegNow = async (id: string) => {
  const res = await brewer.get(`/api/kegs/${id}`);
  expect(res.status).toBe(200);
  return res.body.keg as {
    state: string;
    whereabouts: string;
    tap: { code: string } | null;
    contents: { remainingLiters: number } | null;
    carbonation: unknown;
  };
};

async function openKeg(page: Page, code: string, id: string) {
  await page.goto(`/kegs/${id}`);
  await page
    .getByRole('heading', { name: new RegExp(code) })
    .first()
    .waitFor();
}

describe('a keg is returned, emptied or dumped only after saying what that changes', { timeout: 180_000 }, () => {
  it('“Returned” names the keg, the litres written off and the plan that closes; cancel keeps all three', async () => {
    const { returned } = made;
    const before = await kegNow(returned.id);
    expect(before).toMatchObject({ whereabouts: 'with_member', contents: { remainingLiters: 16 } });
    expect(before.carbonation).not.toBeNull();

    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await openKeg(page, returned.code, returned.id);
    await page.getByRole('button', { name: /^Returned/ }).click();
    const dialog = page.getByRole('dialog', { name: `Record ${returned.code} as returned?` });
    await dialog.waitFor();
    const changes = dialog.getByRole('list', { name: 'What this changes' });
    await changes.getByText(`${returned.code} comes back from Caspian Reyes to the cellar.`).waitFor();
    await changes.getByText(new RegExp(`16(\\.0)? L of ${returned.batchName} recorded in it are written off`)).waitFor();
    await changes.getByText('The carbonation plan (set and hold to 2.4 volumes) closes.').waitFor();
    // The dialog fits the phone's screen.
    const box = await dialog.boundingBox();
    expect(box!.x).toBeGreaterThanOrEqual(0);
    expect(box!.x + box!.width).toBeLessThanOrEqual(phone.width);
    await screenshot(page, 'keg-confirm-returned-phone');

    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(await kegNow(returned.id)).toEqual(before);

    await page.getByRole('button', { name: /^Returned/ }).click();
    await dialog.getByRole('button', { name: 'Record it returned' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByRole('status').getByText(`${returned.code} recorded as returned; clean it before it is filled again.`).waitFor();
    await page.getByText('Empty.').waitFor();
    const after = await kegNow(returned.id);
    expect(after).toMatchObject({ whereabouts: 'cellar', state: 'needs_cleaning', contents: null, carbonation: null });
    await context.close();
  });

  it('“Emptied” says the keg comes off its tap; cancel leaves it on tap and full', async () => {
    const { emptied } = made;
    const before = await kegNow(emptied.id);
    expect(before).toMatchObject({ state: 'holding', tap: { code: 'T-2' }, contents: { remainingLiters: 18 } });

    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: desktop });
    await openKeg(page, emptied.code, emptied.id);
    await page.getByRole('button', { name: /^Emptied/ }).click();
    const dialog = page.getByRole('dialog', { name: `Record ${emptied.code} as emptied?` });
    await dialog.waitFor();
    await dialog.getByText(new RegExp(`18(\\.0)? L of ${emptied.batchName} recorded in it are written off`)).waitFor();
    await dialog.getByText('It comes off tap T-2, whose line then needs cleaning.').waitFor();
    await dialog.getByText('No carbonation plan is open.').waitFor();
    await page.keyboard.press('Escape');
    await dialog.waitFor({ state: 'hidden' });
    expect(await kegNow(emptied.id)).toEqual(before);

    await page.getByRole('button', { name: /^Emptied/ }).click();
    await dialog.getByRole('button', { name: 'Record it emptied' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByRole('status').getByText(`${emptied.code} recorded as emptied`).waitFor();
    expect(await kegNow(emptied.id)).toMatchObject({ state: 'needs_cleaning', tap: null, contents: null });
    await context.close();
  });

  it('“Dumped” records a loss only after the second yes', async () => {
    const { dumped } = made;
    const before = await kegNow(dumped.id);
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: desktop });
    await openKeg(page, dumped.code, dumped.id);
    await page.getByRole('button', { name: /^Dumped/ }).click();
    const dialog = page.getByRole('dialog', { name: `Record the beer in ${dumped.code} as dumped (poured away)?` });
    await dialog.getByText(new RegExp(`18(\\.0)? L of ${dumped.batchName} recorded in it are written off as dumped`)).waitFor();
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(await kegNow(dumped.id)).toEqual(before);

    await page.getByRole('button', { name: /^Dumped/ }).click();
    await dialog.getByRole('button', { name: 'Record it dumped' }).click();
    await dialog.waitFor({ state: 'hidden' });
    const fill = await ctx.db
      .selectFrom('keg_fill')
      .select(['emptied_reason'])
      .where('keg_id', '=', dumped.id)
      .orderBy('filled_at', 'desc')
      .executeTakeFirstOrThrow();
    expect(fill.emptied_reason).toBe('dumped');
    await context.close();
  });
});

describe('a batch is discarded only after a second yes', { timeout: 120_000 }, () => {
  it('names the batch; cancel keeps it fermenting, confirm discards it', async () => {
    const member = await ctx.signIn('member@example.org');
    const status = async () => (await member.get(`/api/batches/${made.batch.id}`)).body.status as string;
    const before = await status();
    expect(before).not.toBe('discarded');

    const { page, context } = await signedInPage(browser, server.url, 'member@example.org', { viewport: desktop });
    await page.goto(`/batches/${made.batch.id}`);
    await page.getByRole('heading', { name: made.batch.name }).first().waitFor();
    await page.getByRole('button', { name: 'Discard…' }).click();
    const dialog = page.getByRole('dialog', { name: `Discard ${made.batch.name}?` });
    await dialog.getByText('This cannot be undone.', { exact: false }).waitFor();
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(await status()).toBe(before);

    await page.getByRole('button', { name: 'Discard…' }).click();
    await dialog.getByRole('button', { name: 'Discard it' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await expect.poll(status).toBe('discarded');
    await context.close();
  });
});

describe('an invoice run issues nothing until the treasurer confirms the count and the total', { timeout: 120_000 }, () => {
  it('states how many invoices, to how many members and the total; cancel issues none, confirm issues them all', async () => {
    const preview = await treasurer.get(`/api/invoice-runs/preview?period=${made.period}`);
    expect(preview.status).toBe(200);
    const toBill = (preview.body.invoices as { memberId: string; alreadyInvoiced: boolean; totalCents: number }[]).filter((i) => !i.alreadyInvoiced);
    expect(toBill.length).toBeGreaterThan(1);
    const total = toBill.reduce((s, i) => s + i.totalCents, 0);
    const invoicesOfPeriod = async () => (await treasurer.get(`/api/invoices?period=${made.period}`)).body.total as number;
    expect(await invoicesOfPeriod()).toBe(0);

    const { page, context } = await signedInPage(browser, server.url, 'treasurer@example.org', { viewport: desktop, context: { locale: 'en-GB' } });
    await page.goto(`/billing/run?period=${made.period}`);
    await page.getByRole('button', { name: `Run and issue ${toBill.length} invoices…` }).click();
    const dialog = page.getByRole('dialog', { name: `Issue ${toBill.length} invoices for ${periodLabel(made.period)}?` });
    await dialog.waitFor();
    const summary = await dialog.getByText(`${toBill.length} invoices to ${toBill.length} members`).textContent();
    expect(summary).toContain(formatMoney(total, preview.body.currency));
    await screenshot(page, 'billing-run-confirm');
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(await invoicesOfPeriod()).toBe(0);

    await page.getByRole('button', { name: `Run and issue ${toBill.length} invoices…` }).click();
    await dialog.getByRole('button', { name: `Issue ${toBill.length} invoices` }).click();
    await page.getByText(`${periodLabel(made.period)}: ${toBill.length} invoices issued`).waitFor();
    expect(await invoicesOfPeriod()).toBe(toBill.length);
    await context.close();
  });

  it('made as drafts first, the run’s drafts are issued only after the same confirmation', async () => {
    const period = nextPeriod(made.period, -1);
    const count = async (status: 'draft' | 'issued') => (await treasurer.get(`/api/invoices?period=${period}&status=${status}`)).body.total as number;
    expect(await count('draft')).toBe(0);

    const { page, context } = await signedInPage(browser, server.url, 'treasurer@example.org', { viewport: desktop, context: { locale: 'en-GB' } });
    await page.goto(`/billing/run?period=${period}`);
    await page.getByRole('button', { name: 'Make drafts to review first' }).click();
    await page.getByText(/invoices? made as drafts/).waitFor();
    const drafts = await count('draft');
    expect(drafts).toBeGreaterThan(0);

    await page.getByRole('button', { name: 'Issue all drafts…' }).click();
    const dialog = page.getByRole('dialog', { name: `Issue the ${drafts} invoice${drafts === 1 ? '' : 's'} of this run?` });
    await dialog.getByText('cannot be taken back', { exact: false }).waitFor();
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect([await count('draft'), await count('issued')]).toEqual([drafts, 0]);

    await page.getByRole('button', { name: 'Issue all drafts…' }).click();
    await dialog.getByRole('button', { name: /^Issue \d+ invoices?$/ }).click();
    await page.getByText(/invoices? issued/).waitFor();
    expect([await count('draft'), await count('issued')]).toEqual([0, drafts]);
    await context.close();
  });
});
