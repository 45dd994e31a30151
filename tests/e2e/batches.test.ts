import type { Browser } from 'playwright-core';
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

const signIn = (email: string) => signedInPage(browser, server.url, email);

// A floating digital hydrometer's export, semicolon-separated with decimal commas, headers its own way.
const exportCsv = [
  'Timestamp;Specific gravity;Temp (°C);Comment',
  '2026-11-02 08:00;1,056;20,1;pitched',
  '2026-11-03 08:00;1,049;20,4;',
  '2026-11-04 08:00;1,036;20,8;krausen',
  '2026-11-05 08:00;1,026;20,6;',
  '2026-11-06 08:00;1,019;20,2;',
  '2026-11-07 08:00;1,015;20,0;',
  '2026-11-08 08:00;1,013;19,8;',
  '2026-11-09 08:00;1,012;19,8;',
  '2026-11-10 08:00;1,012;19,7;',
  '2026-11-11 08:00;1,012;19,7;steady',
].join('\r\n');

// Each test drives several screens on a shared 2-core machine: give them room.
describe('importing readings in the browser', { timeout: 120_000 }, () => {
  it('a member imports a CSV through the mapping and preview steps and sees the gravity chart', async () => {
    const { page, context } = await signIn('member@example.org');

    // A new batch, from the Batches screen.
    await page.getByRole('link', { name: 'Batches', exact: true }).click();
    await page.waitForURL('**/batches');
    await page.getByRole('button', { name: 'New batch' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Name').fill('November test IPA');
    await dialog.getByLabel('Style').fill('IPA');
    await dialog.getByLabel(/Volume/).fill('23');
    await dialog.getByLabel('Target OG').fill('1.056');
    await dialog.getByLabel('Target FG').fill('1.012');
    await dialog.getByRole('button', { name: 'Create the batch' }).click();
    await page.waitForURL(/\/batches\/[0-9a-f-]{36}$/);
    const batchId = page.url().split('/').pop()!;
    await page.getByRole('heading', { name: /November test IPA/ }).waitFor();

    // Upload: the server proposes a mapping from the headers.
    await page.getByRole('link', { name: 'Import readings' }).click();
    await page.waitForURL(`**/batches/${batchId}/import`);
    await page.getByLabel('Readings file').setInputFiles({ name: 'hydrometer-export.csv', mimeType: 'text/csv', buffer: Buffer.from(exportCsv, 'utf8') });
    await page.getByText(/proposed from the column names/).waitFor();
    expect(await page.locator('select[data-field="takenAt"]').inputValue()).toBe('Timestamp');
    expect(await page.locator('select[data-field="gravity"]').inputValue()).toBe('Specific gravity');
    expect(await page.locator('select[data-field="temperature"]').inputValue()).toBe('Temp (°C)');
    expect(await page.locator('select[data-field="note"]').inputValue()).toBe('Comment');
    // The digital hydrometer compensates for temperature itself.
    await page.getByLabel(/Correct hydrometer readings/).uncheck();
    await screenshot(page, 'batches-import-mapping');

    // Preview: every row fine, decimal commas read.
    await page.getByRole('button', { name: 'Preview the rows' }).click();
    const preview = page.getByTestId('import-preview');
    await preview.waitFor();
    await preview.getByText('No problems').waitFor();
    expect(await preview.locator('tbody tr[data-status="ok"]').count()).toBe(10);
    await preview.getByText('1.0560').first().waitFor();
    await screenshot(page, 'batches-import-preview');

    // Import, then the batch page with its chart.
    await page.getByRole('button', { name: 'Import 10 readings' }).click();
    await page.waitForURL(new RegExp(`/batches/${batchId}$`));
    await page.getByText('Imported 10 readings').waitFor();
    const chart = page.getByTestId('gravity-chart');
    await chart.locator('svg .recharts-line').first().waitFor();
    expect(await chart.locator('.recharts-line-dots circle, .recharts-dot').count()).toBeGreaterThanOrEqual(10);
    await expect.poll(() => page.getByTestId('figure-og').textContent()).toContain('1.056');
    expect(await page.getByTestId('figure-fg').textContent()).toContain('1.012');
    expect(await page.getByTestId('stable-signal').textContent()).toMatch(/Stable since/);
    await page.getByRole('cell', { name: 'steady' }).waitFor();
    await page.mouse.move(0, 0);
    await screenshot(page, 'batches-chart-after-import');

    const stored = await ctx.db.selectFrom('reading').select((eb) => eb.fn.countAll<number>().as('n')).where('batch_id', '=', batchId).executeTakeFirstOrThrow();
    expect(Number(stored.n)).toBe(10);
    await context.close();
  });

  it('marks a malformed row in the preview and imports nothing', async () => {
    const { page, context } = await signIn('member@example.org');
    const member = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    const batch = await ctx.db.insertInto('batch').values({ owner_id: member.id, name: 'Bad file batch', volume_liters: 20, created_by: member.id }).returning('id').executeTakeFirstOrThrow();
    await page.goto(`/batches/${batch.id}/import`);
    const bad = 'Taken at,Gravity\n2026-11-02 08:00,1.050\n2026-11-03 08:00,one point oh\n';
    await page.getByLabel('Readings file').setInputFiles({ name: 'bad.csv', mimeType: 'text/csv', buffer: Buffer.from(bad) });
    await page.getByRole('button', { name: 'Preview the rows' }).click();
    const preview = page.getByTestId('import-preview');
    await preview.getByText('1 problem').waitFor();
    expect(await preview.locator('tbody tr[data-status="error"]').count()).toBe(1);
    expect(await page.getByTestId('import-problems').textContent()).toMatch(/Row 3, Gravity: Not a number/);
    expect(await page.getByRole('button', { name: /^Import/ }).isDisabled()).toBe(true);
    await screenshot(page, 'batches-import-problem');
    const stored = await ctx.db.selectFrom('reading').select((eb) => eb.fn.countAll<number>().as('n')).where('batch_id', '=', batch.id).executeTakeFirstOrThrow();
    expect(Number(stored.n)).toBe(0);
    await context.close();
  });

  it('shows the brewer on duty every member’s batches, a digital-hydrometer log and the stuck batch', async () => {
    const { page, context } = await signIn('brewer@example.org');
    await page.goto('/batches?status=fermenting');
    await page.getByRole('columnheader', { name: /Member/ }).waitFor();
    await page.locator('tbody tr a').first().waitFor();
    await screenshot(page, 'batches-list-brewer');

    // The seeded batch logged every half hour by a floating hydrometer: drawn as bucket averages.
    const digital = await ctx.db.selectFrom('batch').select('id').where('notes', 'like', '%digital hydrometer%').executeTakeFirstOrThrow();
    await page.goto(`/batches/${digital.id}`);
    await page.getByTestId('gravity-chart').locator('svg .recharts-line').first().waitFor();
    expect(await page.getByTestId('gravity-chart').textContent()).toMatch(/averages over equal stretches of time|Readings/);
    await page.mouse.move(0, 0);
    await screenshot(page, 'batches-digital-hydrometer');

    // The stuck one: stable, but far above its target.
    const stuck = await ctx.db.selectFrom('batch').select('id').where('notes', 'like', '%sat at 1.030%').executeTakeFirstOrThrow();
    await page.goto(`/batches/${stuck.id}`);
    await expect.poll(() => page.getByTestId('stable-signal').textContent()).toMatch(/may be stuck/);
    await page.mouse.move(0, 0);
    await screenshot(page, 'batches-stuck');
    // The brewer on duty in the cellar, on a phone.
    await page.setViewportSize(phone);
    await page.getByTestId('gravity-chart').locator('svg').first().waitFor();
    await screenshot(page, 'batches-stuck-phone');
    await context.close();
  });

  it('adds a reading by hand and shows the hydrometer correction before saving', async () => {
    const { page, context } = await signIn('member@example.org');
    const member = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    const batch = await ctx.db.insertInto('batch').values({ owner_id: member.id, name: 'Hand readings batch', volume_liters: 20, created_by: member.id }).returning('id').executeTakeFirstOrThrow();
    await page.goto(`/batches/${batch.id}`);
    await page.getByRole('button', { name: 'Add a reading' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Gravity').fill('1.050');
    await dialog.getByLabel(/Sample temperature/).fill('30');
    await expect.poll(() => dialog.getByTestId('correction-preview').textContent()).toMatch(/Stored as 1\.052\d SG — read 1\.0500 at 30\.0 °C, corrected to 20 °C/);
    await screenshot(page, 'batches-reading-form');
    await dialog.getByRole('button', { name: 'Add the reading' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByRole('cell', { name: /1\.052\d\s*corrected/ }).waitFor();
    expect(await page.getByTestId('figure-og').textContent()).toMatch(/1\.05[23]/);
    await context.close();
  });

  it('gives the treasurer the production records with litres, US barrels and the licensing note', async () => {
    const { page, context } = await signIn('treasurer@example.org');
    await page.goto('/production-records');
    await page.getByLabel('From month').fill('2026-09');
    await page.getByLabel('To month').fill('2026-11');
    await page.getByRole('cell', { name: /batches?$/ }).first().waitFor();
    expect(await page.getByRole('status').first().textContent()).toMatch(/Local licensing and excise rules govern/);
    expect(await page.getByRole('link', { name: 'Export CSV' }).getAttribute('href')).toBe('/api/production-records/export?from=2026-09&to=2026-11&format=csv');
    await screenshot(page, 'batches-production-records');
    await context.close();
  });

  it('lets the admin set the stable-gravity test in Settings', async () => {
    const { page, context } = await signIn('admin@example.org');
    await page.goto('/settings#fermentation');
    const form = page.getByRole('form', { name: 'Fermentation settings' });
    await form.waitFor();
    expect(await form.getByLabel('Stable within (SG)').inputValue()).toBe('0.001');
    await form.getByLabel('Over (days)').fill('2');
    await form.getByRole('button', { name: 'Save the fermentation settings' }).click();
    await form.getByText('Fermentation settings saved').waitFor();
    const row = await ctx.db.selectFrom('setting').select('value').where('key', '=', 'fermentation').executeTakeFirstOrThrow();
    expect(row.value).toMatchObject({ stableToleranceSg: 0.001, stableSpanDays: 2 });
    await form.screenshot({ path: 'test-artifacts/screenshots/batches-fermentation-settings.png' });
    await context.close();
  });
});
