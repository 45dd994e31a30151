import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, phone, screenshot, serve, signedInPage } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext;
let server: Awaited<ReturnType<typeof serve>>;
let browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  server = await serve(ctx);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
  await ctx?.close();
});

async function signInOnPhone(email: string): Promise<Page> {
  const { page } = await signedInPage(browser, server.url, email, { viewport: phone, context: { hasTouch: true, isMobile: true } });
  return page;
}

/** Every visible button and checkbox row on the page is at least 48 px tall. */
async function smallTargets(page: Page, scope: string): Promise<string[]> {
  return page.locator(`${scope} button:visible, ${scope} label:has(input[type=checkbox]):visible, ${scope} label:has(input[type=radio]):visible`).evaluateAll((els) =>
    els.filter((el) => el.getBoundingClientRect().height < 47.5).map((el) => (el.textContent ?? '').trim().slice(0, 40)),
  );
}

describe('the brewer on duty in the cellar, on a phone', { timeout: 180_000 }, () => {
  it('records a sanitation cycle on a keg from its label page, then a transfer into it', async () => {
    // A keg that needs cleaning, in the cellar; a batch still in its fermenter.
    const keg = await ctx.db
      .selectFrom('equipment as e')
      .leftJoin('keg_whereabouts as w', 'w.keg_id', 'e.id')
      .select(['e.id', 'e.code'])
      .where('e.kind', '=', 'keg')
      .where('e.state', '=', 'needs_cleaning')
      .where((eb) => eb.or([eb('w.whereabouts', 'is', null), eb('w.whereabouts', '=', 'cellar')]))
      .orderBy('e.code')
      .executeTakeFirstOrThrow();
    const batch = await ctx.db
      .selectFrom('batch as b')
      .innerJoin('booking as bk', 'bk.batch_id', 'b.id')
      .innerJoin('equipment as f', 'f.id', 'bk.equipment_id')
      .select(['b.id', 'b.name', 'f.code as fermenter'])
      .where('b.status', 'in', ['fermenting', 'conditioning'])
      .where('f.kind', '=', 'fermenter')
      .orderBy('f.code')
      .executeTakeFirstOrThrow();

    const page = await signInOnPhone('brewer@example.org');

    // The keg's QR label opens its page; the brewer starts a cycle from there.
    await page.goto(`/cellar/${keg.id}`);
    await page.getByRole('heading', { name: new RegExp(keg.code) }).first().waitFor();
    await page.getByRole('link', { name: 'Record a cycle' }).click();
    await page.waitForURL(`**/sanitation/new?equipmentId=${keg.id}`);
    await page.getByRole('heading', { name: `Clean ${keg.code}` }).waitFor();
    await screenshot(page, 'cellar-phone-1-cycle-checklist');
    expect(await smallTargets(page, 'main')).toEqual([]);

    // Clean (the co-op's alkaline cleaner, an hour's soak), rinse, sanitize, purge: each marked done as it happens.
    await page.getByRole('button', { name: 'Mark clean done' }).click();
    await page.getByRole('button', { name: 'Mark rinse done' }).click();
    await page.getByText(/cleaned but not ready/).waitFor();
    await page.getByRole('button', { name: 'Mark sanitize done' }).click();
    await page.getByRole('button', { name: 'Mark purge done' }).click();
    await page.getByText('The vessel will be ready to fill.').waitFor();
    await screenshot(page, 'cellar-phone-2-cycle-complete');
    await page.getByRole('button', { name: 'Save cycle' }).click();
    await page.getByRole('heading', { name: new RegExp(`Cycle saved: ${keg.code} is now`) }).waitFor();
    expect(await page.getByText(/Ready until/).count()).toBe(1);
    await screenshot(page, 'cellar-phone-3-cycle-saved');

    const stored = await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow();
    expect(stored.state).toBe('ready');
    const cycle = await ctx.db.selectFrom('sanitation_cycle').select(['id', 'outcome', 'recorded_by']).where('equipment_id', '=', keg.id).orderBy('created_at', 'desc').executeTakeFirstOrThrow();
    expect(cycle.outcome).toBe('ready');

    // Straight on to the transfer into it, keg already picked.
    await page.getByRole('link', { name: `Transfer beer into ${keg.code}` }).click();
    await page.waitForURL(/\/transfers\/new\?kegIds=/);
    await page.getByRole('heading', { name: 'Transfer to kegs' }).waitFor();
    expect(await page.getByRole('checkbox', { name: new RegExp(keg.code) }).isChecked()).toBe(true);
    await page.getByLabel('Batch and its fermenter').selectOption(batch.id);
    await page.getByLabel(/Drawn from the fermenter/).fill('19.5');
    await page.getByLabel(/Lost: trub/).fill('0.8');
    const record = page.getByRole('button', { name: 'Record the transfer' });
    expect(await record.isDisabled()).toBe(true);
    for (const box of await page.locator('section[aria-labelledby="checklist-title"] input[type=checkbox]').all()) await box.check();
    await page.getByLabel('Finings', { exact: true }).selectOption('gelatin');
    await page.getByLabel(/Dose/).fill('2');
    await screenshot(page, 'cellar-phone-4-transfer-checklist');
    expect(await smallTargets(page, 'main')).toEqual([]);
    await record.click();
    await page.getByRole('heading', { name: 'Transfer recorded' }).waitFor();
    await page.getByText(new RegExp(`${batch.name} from ${batch.fermenter} into ${keg.code}`)).waitFor();
    await screenshot(page, 'cellar-phone-5-transfer-recorded');

    const after = await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow();
    expect(after.state).toBe('holding');
    const fill = await ctx.db.selectFrom('keg_fill').select(['batch_id', 'volume_liters', 'sanitation_cycle_id']).where('keg_id', '=', keg.id).where('emptied_at', 'is', null).executeTakeFirstOrThrow();
    expect(fill).toMatchObject({ batch_id: batch.id, sanitation_cycle_id: cycle.id });
    expect(Number(fill.volume_liters)).toBeCloseTo(18.7, 2);
    const transfer = await ctx.db.selectFrom('transfer').select(['finings_kind', 'finings_amount', 'loss_liters']).where('batch_id', '=', batch.id).executeTakeFirstOrThrow();
    expect(transfer).toMatchObject({ finings_kind: 'gelatin' });
    expect(Number(transfer.loss_liters)).toBeCloseTo(0.8, 2);

    // The keg's page now shows what it holds.
    await page.getByRole('link', { name: keg.code }).first().click();
    await page.getByRole('heading', { name: 'What it holds' }).waitFor();
    await page.getByText(batch.name).first().waitFor();
    await screenshot(page, 'cellar-phone-6-keg-page');
    await page.context().close();
  });

  it('shows the tap board and the overdue kegs to the brewer on duty', async () => {
    const page = await signInOnPhone('brewer@example.org');
    await page.goto('/kegs/tap-board');
    await page.getByRole('list', { name: 'Taps' }).waitFor();
    expect(await page.getByText('On tap').count()).toBeGreaterThanOrEqual(3);
    await screenshot(page, 'cellar-phone-7-tap-board');
    await page.getByRole('link', { name: 'Overdue' }).click();
    await page.getByRole('list', { name: 'Overdue kegs' }).waitFor();
    expect(await page.getByText(/days late/).count()).toBeGreaterThanOrEqual(4);
    await screenshot(page, 'cellar-phone-8-overdue');
    await page.context().close();
  });
});
