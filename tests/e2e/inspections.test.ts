import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCo2Cylinder, createInspection, createKeg, DAY, fillKeg } from '../../db/factories/index.ts';
import { closeAll, phone, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext, server: Served, browser: Browser;
let keg: { id: string; code: string };

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  keg = await createKeg(ctx.db, { code: 'K-4401', attributes: { ratedPressureKpa: 896 } });
  await createInspection(ctx.db, { equipmentId: keg.id, kind: 'pressure_test', at: new Date(now - 740 * DAY), nextDueAt: new Date(now - 10 * DAY) });
  await createCo2Cylinder(ctx.db, {
    code: 'C-44',
    attributes: { sizeKg: 6, fillPercent: 100, hydroTestDue: new Date(now - 5 * DAY).toISOString().slice(0, 10) },
  });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

describe('the brewer on duty keeps the pressure-vessel records', { timeout: 120_000 }, () => {
  it('sees the overdue keg and cylinder on Today, records a passing pressure test on a phone, and the keg leaves the list', async () => {
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone });
    await page.goto('/');
    const card = page.getByRole('region', { name: 'Inspections due' });
    await card.getByRole('link', { name: 'K-4401' }).waitFor();
    await card.getByRole('link', { name: 'C-44' }).waitFor();
    expect(await card.getByText(/Pressure test was due/).count()).toBeGreaterThan(0);
    expect(await card.getByText(/Hydrostatic test was due/).count()).toBeGreaterThan(0);
    await card.scrollIntoViewIfNeeded();
    await page.screenshot({ path: '/tmp/insp-today-phone.png', fullPage: true });

    await card.getByRole('link', { name: 'K-4401' }).click();
    await page.waitForURL(`**/cellar/${keg.id}`);
    await page.getByText('K-4401 may not be filled or carbonated').waitFor();
    await page.getByText('896 kPa (130 psi)').first().waitFor();
    const form = page.getByRole('form', { name: 'Record an inspection' });
    await form.getByLabel('Inspection').selectOption('pressure_test');
    await form.getByLabel('Note (optional)').fill('Held 60 psi for 10 minutes');
    await page.screenshot({ path: '/tmp/insp-keg-form-phone.png', fullPage: true });
    await form.getByRole('button', { name: 'Record inspection' }).click();
    await page.getByText('Pressure test recorded (passed).').waitFor();
    await expect.poll(() => page.getByText('K-4401 may not be filled or carbonated').count()).toBe(0);
    await page.screenshot({ path: '/tmp/insp-keg-recorded-phone.png', fullPage: true });

    const rows = await ctx.db.selectFrom('equipment_inspection').selectAll().where('equipment_id', '=', keg.id).orderBy('at', 'desc').execute();
    expect(rows[0]).toMatchObject({ kind: 'pressure_test', passed: true, note: 'Held 60 psi for 10 minutes' });

    await page.goto('/');
    await card.getByRole('link', { name: 'C-44' }).waitFor();
    expect(await card.getByRole('link', { name: 'K-4401' }).count()).toBe(0);

    await page.goto('/cellar/maintenance');
    await page.getByRole('heading', { name: 'Maintenance' }).waitFor();
    await page.getByRole('row').filter({ hasText: 'C-44' }).waitFor();
    await page.screenshot({ path: '/tmp/insp-maintenance-phone.png', fullPage: true });
    await context.close();
  });

  it('shows the keg’s rating and the pressure cautions in the planner, and the intervals in Settings', async () => {
    const rated = await createKeg(ctx.db, { code: 'K-4402', attributes: { ratedPressureKpa: 200 } });
    await fillKeg(ctx.db, { kegId: rated.id, at: new Date(ctx.clock.now().getTime() - 3600_000) });
    const { page, context } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone });
    await page.goto(`/kegs/${rated.id}/carbonation`);
    const rating = page.getByTestId('keg-rating');
    await rating.getByText(/200 kPa|2\.00 bar/).waitFor();
    await page.getByRole('complementary', { name: 'Pressure and CO2 safety' }).waitFor();
    await page.screenshot({ path: '/tmp/insp-planner-phone.png', fullPage: true });
    await page.goto('/settings');
    await page.getByRole('form', { name: 'Pressure-vessel settings' }).waitFor();
    expect(await page.getByRole('form', { name: 'Pressure-vessel settings' }).getByLabel('Pressure test (months)').inputValue()).toBe('24');
    await context.close();
  });
});
