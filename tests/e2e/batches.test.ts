import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createTransfer, DAY, HOUR, type ReadingInput } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, phone, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext, server: Served, browser: Browser;

/** 'YYYY-MM' of the month `offset` months from the one `at` is in (UTC). */
const monthOf = (at: Date, offset = 0) => new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth() + offset, 1)).toISOString().slice(0, 7);

// What the brewer-on-duty and treasurer tests look at, made in beforeAll and dated from the test clock.
const made = {
  digitalId: '',
  stuckId: '',
  fermenting: [] as { name: string; owner: string }[],
  packaged: [] as { name: string; month: string }[],
};

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const at = (ms: number) => new Date(now + ms);

  // Two batches packaged in earlier months (the production records), from F-01 and F-02 into kegs.
  for (const [i, p] of [
    { name: 'Harvest brown ale', owner: 'member2', fermenter: 'F-01', keg: 'K-001', packagedAgo: 50 * DAY },
    { name: 'Kellerbier', owner: 'member3', fermenter: 'F-02', keg: 'K-002', packagedAgo: 20 * DAY },
  ].entries()) {
    const packagedAt = at(-p.packagedAgo);
    const batch = await createBatch(ctx.db, {
      ownerId: fixtureUserId(p.owner),
      name: p.name,
      style: i === 0 ? 'Brown ale' : 'Lager',
      volumeLiters: 20,
      targetOg: 1.052,
      targetFg: 1.012,
      readings: [
        { takenAt: new Date(packagedAt.getTime() - 16 * DAY), value: 1.052 },
        { takenAt: new Date(packagedAt.getTime() - 10 * DAY), value: 1.018 },
        { takenAt: new Date(packagedAt.getTime() - 4 * DAY), value: 1.012 },
        { takenAt: new Date(packagedAt.getTime() - 2 * DAY), value: 1.012 },
      ],
    });
    await createTransfer(ctx.db, {
      batchId: batch.id,
      fromEquipmentId: fixtureEquipmentId(p.fermenter),
      kegIds: [fixtureEquipmentId(p.keg)],
      at: packagedAt,
      kegVolumesLiters: [18.5],
      lossLiters: 1,
      recordedBy: fixtureUserId('brewer'),
    });
    made.packaged.push({ name: p.name, month: monthOf(packagedAt) });
  }

  // A member's batch fermenting in F-01, logged by hand.
  const start = at(-6 * DAY);
  await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: 'Winter amber',
    style: 'Amber ale',
    targetOg: 1.054,
    targetFg: 1.013,
    readings: [
      { takenAt: start, value: 1.054 },
      { takenAt: at(-4 * DAY), value: 1.036 },
      { takenAt: at(-2 * DAY), value: 1.022 },
    ],
    fermenter: { equipmentId: fixtureEquipmentId('F-01'), startsAt: new Date(start.getTime() - HOUR), endsAt: at(14 * DAY), now: at(0) },
  });
  made.fermenting.push({ name: 'Winter amber', owner: 'Maren Holloway' });

  // Logged every half hour for ten days by a floating digital hydrometer, in F-03: more readings
  // (some 480) than the chart draws points.
  const digitalStart = at(-10 * DAY);
  const digital: ReadingInput[] = [];
  for (let t = digitalStart.getTime(); t <= now - HOUR; t += 30 * 60_000) {
    const days = (t - digitalStart.getTime()) / DAY;
    const sg = 1.012 + 0.048 * Math.exp(-days / 2) + 0.0003 * Math.sin(days * 9); // the float bobs a little
    digital.push({ takenAt: new Date(t), value: Math.round(sg * 10_000) / 10_000, temperatureC: 19.5, correctTemperature: false, source: 'import' });
  }
  const logged = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member4'),
    name: 'Session pale (logged)',
    style: 'Pale ale',
    targetOg: 1.06,
    targetFg: 1.012,
    notes: 'Logged every half hour by a floating digital hydrometer.',
    readings: digital,
    fermenter: { equipmentId: fixtureEquipmentId('F-03'), startsAt: new Date(digitalStart.getTime() - HOUR), endsAt: at(10 * DAY), now: at(0) },
  });
  made.digitalId = logged.id;
  made.fermenting.push({ name: 'Session pale (logged)', owner: 'Caspian Reyes' });

  // The stuck one in F-04: stable for four days at 1.030, far above its 1.014 target.
  const stuck = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member6'),
    name: 'Imperial porter',
    style: 'Porter',
    volumeLiters: 100,
    targetOg: 1.074,
    targetFg: 1.014,
    notes: 'Gravity sat at 1.030 for four days.',
    readings: [1.074, 1.058, 1.044, 1.034, 1.03, 1.03, 1.03, 1.03, 1.03].map((value, i, all) => ({ takenAt: at(-(all.length - i) * DAY + 2 * HOUR), value })),
    fermenter: { equipmentId: fixtureEquipmentId('F-04'), startsAt: at(-10 * DAY), endsAt: at(12 * DAY), now: at(0) },
  });
  made.stuckId = stuck.id;
  made.fermenting.push({ name: 'Imperial porter', owner: 'Bram Whitlock' });

  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

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

    const stored = await ctx.db
      .selectFrom('reading')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('batch_id', '=', batchId)
      .executeTakeFirstOrThrow();
    expect(Number(stored.n)).toBe(10);
    await context.close();
  });

  it('marks a malformed row in the preview and imports nothing', async () => {
    const { page, context } = await signIn('member@example.org');
    const member = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    const batch = await createBatch(ctx.db, { ownerId: member.id, name: 'Bad file batch', volumeLiters: 20 });
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
    const stored = await ctx.db
      .selectFrom('reading')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('batch_id', '=', batch.id)
      .executeTakeFirstOrThrow();
    expect(Number(stored.n)).toBe(0);
    await context.close();
  });

  it('shows the brewer on duty every member’s batches, a digital-hydrometer log and the stuck batch', async () => {
    const { page, context } = await signIn('brewer@example.org');
    await page.goto('/batches?status=fermenting');
    await page.getByRole('columnheader', { name: /Member/ }).waitFor();
    await page.locator('tbody tr a').first().waitFor();
    // Every member's fermenting batch, each with its owner; the packaged ones are filtered out.
    for (const b of made.fermenting) await page.getByRole('row').filter({ hasText: b.name }).filter({ hasText: b.owner }).waitFor();
    for (const b of made.packaged) expect(await page.getByRole('row').filter({ hasText: b.name }).count()).toBe(0);
    await screenshot(page, 'batches-list-brewer');

    // The batch logged every half hour by a floating hydrometer: drawn as bucket averages.
    await page.goto(`/batches/${made.digitalId}`);
    await page.getByTestId('gravity-chart').locator('svg .recharts-line').first().waitFor();
    expect(await page.getByTestId('gravity-chart').textContent()).toMatch(/4\d\d readings, drawn as \d+ averages over equal stretches of time/);
    await page.mouse.move(0, 0);
    await screenshot(page, 'batches-digital-hydrometer');

    // The stuck one: stable, but far above its target.
    await page.goto(`/batches/${made.stuckId}`);
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
    const batch = await createBatch(ctx.db, { ownerId: member.id, name: 'Hand readings batch', volumeLiters: 20 });
    await page.goto(`/batches/${batch.id}`);
    await page.getByRole('button', { name: 'Add a reading' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Gravity').fill('1.050');
    await dialog.getByLabel(/Sample temperature/).fill('30');
    await expect
      .poll(() => dialog.getByTestId('correction-preview').textContent())
      .toMatch(/Stored as 1\.052\d SG — read 1\.0500 at 30\.0 °C, corrected to 20 °C/);
    await screenshot(page, 'batches-reading-form');
    await dialog.getByRole('button', { name: 'Add the reading' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByRole('cell', { name: /1\.052\d\s*corrected/ }).waitFor();
    // The figures are their own query, refetched after the save: wait for them rather than read them once.
    await expect.poll(() => page.getByTestId('figure-og').textContent()).toMatch(/1\.05[23]/);
    // The form's time defaults to the page's now, which is the server's (not the machine's) now.
    const reading = await ctx.db.selectFrom('reading').select('taken_at').where('batch_id', '=', batch.id).executeTakeFirstOrThrow();
    expect(Math.abs(reading.taken_at.getTime() - ctx.clock.now().getTime())).toBeLessThan(10 * 60_000);
    await context.close();
  });

  it('shows how a Brix reading is converted, stores the method and refuses a gravity above the OG', async () => {
    const { page, context } = await signIn('member@example.org');
    const member = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    const batch = await createBatch(ctx.db, {
      ownerId: member.id,
      name: 'Refractometer batch',
      volumeLiters: 20,
      readings: [{ takenAt: new Date(ctx.clock.now().getTime() - 3 * DAY).toISOString(), value: 1.05 }],
    });
    await page.goto(`/batches/${batch.id}`);
    await page.getByRole('button', { name: 'Add a reading' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Scale').selectOption('brix');
    await dialog.getByLabel('Gravity').fill('6');
    // After the OG the default is alcohol-corrected, shown in the form and the preview.
    expect(await dialog.getByLabel('Refractometer sample').inputValue()).toBe('alcohol_corrected');
    await expect.poll(() => dialog.getByTestId('correction-preview').textContent()).toMatch(/Stored as 1\.0\d{3} SG — refractometer reading through alcohol/);
    // Read as wort, 13.1 °Bx is above the OG 1.0500: refused before it is sent.
    await dialog.getByLabel('Refractometer sample').selectOption('wort');
    await dialog.getByLabel('Gravity').fill('13.1');
    await expect.poll(() => dialog.getByTestId('correction-preview').textContent()).toMatch(/above the batch’s original gravity 1\.0500/);
    await dialog.getByLabel('Refractometer sample').selectOption('alcohol_corrected');
    await dialog.getByLabel('Gravity').fill('6');
    await screenshot(page, 'batches-reading-brix-method');
    await dialog.getByRole('button', { name: 'Add the reading' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByTestId('reading-method').filter({ hasText: 'alcohol-corrected' }).waitFor();
    const stored = await ctx.db
      .selectFrom('reading')
      .select('method')
      .where('batch_id', '=', batch.id)
      .where('entered_unit', '=', 'brix')
      .executeTakeFirstOrThrow();
    expect(stored.method).toBe('alcohol_corrected');
    await context.close();
  });

  it('gives the treasurer the production records with litres, US barrels and the licensing note', async () => {
    const { page, context } = await signIn('treasurer@example.org');
    // The three months before the server's current one.
    const now = ctx.clock.now();
    const from = monthOf(now, -3);
    const to = monthOf(now, -1);
    await page.goto('/production-records');
    await page.getByLabel('From month').fill(from);
    await page.getByLabel('To month').fill(to);
    await page
      .getByRole('cell', { name: /: \d+ batch(es)?$/ })
      .first()
      .waitFor();
    // Each batch packaged in those months is a row of its month, with its litres; the month's subtotal counts it.
    for (const b of made.packaged) {
      const row = page.getByRole('row').filter({ has: page.getByRole('link', { name: b.name }) });
      await row.waitFor();
      expect(await row.innerText()).toMatch(/18\.5/);
    }
    expect(new Set(made.packaged.map((b) => b.month)).size).toBe(2); // in two different months
    expect(await page.getByRole('cell', { name: /: 1 batch$/ }).count()).toBe(2);
    expect(await page.getByRole('status').first().textContent()).toMatch(/Local licensing and excise rules govern/);
    expect(await page.getByRole('link', { name: 'Export CSV' }).getAttribute('href')).toBe(`/api/production-records/export?from=${from}&to=${to}&format=csv`);
    await screenshot(page, 'batches-production-records');
    // The monthly report: one row per month, each balanced, with the inventory chart.
    const monthly = page.getByRole('region', { name: 'Monthly report' });
    await monthly.getByRole('img', { name: /Month-end inventory/ }).waitFor();
    const monthRows = monthly.getByRole('row').filter({ has: page.getByRole('rowheader') });
    expect(await monthRows.count()).toBe(3);
    for (const text of await monthRows.allInnerTexts()) expect(text).toMatch(/balances/);
    await page.screenshot({ path: '/tmp/production-monthly-report.png', fullPage: true });
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
