import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createFermenter, createKeg, createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, phone, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { readingsOn } from '../helpers/cellar.ts';

let ctx: TestContext, server: Served, browser: Browser;
const made = { batchId: '', batchName: 'Still falling saison', kegId: '', kegCode: '', fermenterCode: '' };

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const at = (ms: number) => new Date(now + ms);
  const fermenter = await createFermenter(ctx.db, { capacityLiters: 30 });
  made.fermenterCode = fermenter.code;
  // Its gravity still falls: 1.050 → 1.014 → 1.009 over the last three days.
  const batch = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: made.batchName,
    style: 'Saison',
    volumeLiters: 21,
    readings: readingsOn(at, [-10, 1.05], [-3, 1.014], [-1, 1.009]),
    fermenter: { equipmentId: fermenter.id, startsAt: at(-10 * DAY - HOUR), endsAt: at(3 * DAY), now: at(0) },
  });
  made.batchId = batch.id;
  const keg = await createKeg(ctx.db);
  await createSanitationCycle(ctx.db, { equipmentId: keg.id, readyAt: at(-2 * HOUR) });
  made.kegId = keg.id;
  made.kegCode = keg.code;
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

describe('a transfer of a batch whose gravity is not stable, on a phone', { timeout: 120_000 }, () => {
  it('shows the warning and the last readings, asks for a reason, and records it with the times and dissolved oxygen', async () => {
    const { page } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await page.goto(`/transfers/new?kegIds=${made.kegId}`);
    await page.getByRole('heading', { name: 'Transfer to kegs' }).waitFor();
    await page.getByLabel('Batch and its fermenter').selectOption(made.batchId);
    const warning = page.getByRole('alert').filter({ hasText: 'Gravity not stable yet' });
    await warning.waitFor();
    expect(await warning.textContent()).toMatch(/±0\.001 for 3 days/);
    expect(await warning.textContent()).toMatch(/1\.014.*1\.009/);
    expect(await page.getByLabel('Started').inputValue()).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/);

    await page.getByLabel(/Drawn from the fermenter/).fill('19');
    for (const box of await page.locator('section[aria-labelledby="checklist-title"] input[type=checkbox]').all()) await box.check();
    await page.getByLabel('At fill (ppb)').fill('48');
    await page.getByLabel(`In ${made.kegCode} (ppb)`).fill('62');
    const record = page.getByRole('button', { name: 'Record the transfer' });
    // Without a reason it cannot go ahead.
    expect(await record.isDisabled()).toBe(true);
    await page.getByLabel(/Why transfer now/).fill('Fermenter booked for the next brew tomorrow');
    expect(await record.isDisabled()).toBe(false);
    await page.screenshot({ path: '/tmp/transfer-guard-phone-form.png', fullPage: true });
    await record.click();
    await page.getByRole('heading', { name: 'Transfer recorded' }).waitFor();
    await page.getByText('48 ppb at fill').waitFor();
    await page.getByText(/DO 62 ppb/).waitFor();
    await page.getByText('Fermenter booked for the next brew tomorrow').waitFor();
    await page.screenshot({ path: '/tmp/transfer-guard-phone-done.png', fullPage: true });

    const t = await ctx.db.selectFrom('transfer').selectAll().where('batch_id', '=', made.batchId).executeTakeFirstOrThrow();
    expect(t.unstable_gravity_reason).toBe('Fermenter booked for the next brew tomorrow');
    expect(Number(t.dissolved_oxygen_ppb)).toBe(48);
    expect(t.started_at).not.toBeNull();
    expect(t.ended_at!.getTime()).toBe(t.transferred_at.getTime());
    expect(t.ended_at!.getTime()).toBeGreaterThan(t.started_at!.getTime());
    const fill = await ctx.db.selectFrom('keg_fill').select('dissolved_oxygen_ppb').where('transfer_id', '=', t.id).executeTakeFirstOrThrow();
    expect(Number(fill.dissolved_oxygen_ppb)).toBe(62);
  });
});
