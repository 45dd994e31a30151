import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createKeg, createKegCheckout, createTransfer, DAY } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, phone, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

/**
 * Trace and recall on screen: a member sees the finings, allergen note and best-before of a keg they
 * hold (on a phone); the trace report and the batch page list a batch's kegs, who has them and which tap.
 */

let ctx: TestContext, server: Served, browser: Browser;

const shotsDir = '/tmp/cellarwright-trace-screens';
async function shot(page: Page, name: string) {
  fs.mkdirSync(shotsDir, { recursive: true });
  await page.screenshot({ path: path.join(shotsDir, `${name}.png`), fullPage: true });
}

const made = { batchId: '', batchName: 'Gelatin-fined bitter', kegs: [] as { id: string; code: string }[], tapCode: 'T-2', bestBefore: '' };

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const filledAt = new Date(now - 2 * DAY);
  const batch = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member2'),
    name: made.batchName,
    style: 'Best bitter',
    allergens: ['gluten (barley)', 'gluten (wheat)'],
    shelfLifeDays: 8,
    readings: [
      { takenAt: new Date(filledAt.getTime() - 12 * DAY), value: 1.044 },
      { takenAt: new Date(filledAt.getTime() - 4 * DAY), value: 1.011 },
      { takenAt: new Date(filledAt.getTime() - 2 * DAY), value: 1.011 },
    ],
  });
  made.batchId = batch.id;
  for (let i = 0; i < 3; i++) made.kegs.push(await createKeg(ctx.db));
  const { fills } = await createTransfer(ctx.db, {
    batchId: batch.id,
    fromEquipmentId: fixtureEquipmentId('F-03'),
    kegIds: made.kegs.map((k) => k.id),
    at: filledAt,
    kegVolumesLiters: [19, 19, 12],
    finings: { kind: 'gelatin', amount: 6, unit: 'g' },
    recordedBy: fixtureUserId('brewer'),
  });
  made.bestBefore = fills[0]!.best_before!.toISOString();
  // One keg out with the member, one on a tap in the cold room, one in the cellar.
  await createKegCheckout(ctx.db, { kegId: made.kegs[0]!.id, memberId: fixtureUserId('member'), at: new Date(now - DAY), dueAt: new Date(now + 14 * DAY) });
  const brewer = await ctx.signIn('brewer@example.org');
  const moved = await brewer.post(`/api/kegs/${made.kegs[1]!.id}/move`, { to: 'cold_room', tapId: fixtureEquipmentId(made.tapCode) });
  expect(moved.status, JSON.stringify(moved.body)).toBe(200);
  ({ server, browser } = await serveAndLaunch(ctx));
}, 120_000);

afterAll(() => closeAll(browser, server, ctx));

const dayText = (iso: string) => new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', timeZone: 'UTC' }).format(new Date(iso));

describe('trace and best-before on screen', () => {
  it('a member on a phone sees the finings, allergen notes and best-before of the keg they hold', async () => {
    await asSignedIn(browser, server.url, 'member@example.org', { viewport: phone }, async (page) => {
      // Eight days' shelf life filled two days ago: within the week's warning, so Today shows it.
      const card = page.getByRole('region', { name: 'Your kegs near best-before' });
      await card.getByText(made.kegs[0]!.code, { exact: false }).waitFor();
      await card.getByRole('link', { name: new RegExp(made.kegs[0]!.code) }).click();
      await page.getByRole('heading', { name: new RegExp(made.kegs[0]!.code) }).waitFor();
      const holds = page.getByRole('region', { name: 'What it holds' });
      await holds.getByText(made.batchName).waitFor();
      expect(await holds.textContent()).toContain('gelatin (6 g)');
      expect(await holds.textContent()).toContain('gluten (barley), gluten (wheat)');
      expect(await holds.getByText('Near best-before').count()).toBe(1);
      const vegan = holds.locator('dt', { hasText: 'Vegan' }).locator('xpath=following-sibling::dd[1]');
      expect(await vegan.textContent()).toBe('No');
      expect(await holds.textContent()).toContain(dayText(made.bestBefore).split(' ')[0]!);
      await shot(page, 'member-keg-phone');
    });
  });

  it('the trace report and the batch page list the batch’s kegs, who has them and which tap', async () => {
    await asSignedIn(browser, server.url, 'brewer@example.org', async (page) => {
      await page.goto('/trace-report');
      const section = page.getByRole('region', { name: made.batchName });
      await section.waitFor();
      for (const k of made.kegs) await section.getByRole('link', { name: k.code }).waitFor();
      const table = section.getByRole('table');
      const row = (code: string) => table.getByRole('row').filter({ has: page.getByRole('link', { name: code }) });
      expect(await row(made.kegs[0]!.code).textContent()).toContain('Maren Holloway');
      expect(await row(made.kegs[1]!.code).textContent()).toContain(`On tap ${made.tapCode}`);
      expect(await row(made.kegs[2]!.code).textContent()).toContain('Cellar');
      expect(await section.textContent()).toContain('Not vegan');
      await shot(page, 'trace-report');

      await section.getByRole('link', { name: made.batchName }).click();
      const where = page.getByRole('region', { name: 'Where it went' });
      await where.getByRole('link', { name: made.kegs[1]!.code }).waitFor();
      expect(await where.textContent()).toContain(`On tap ${made.tapCode}`);
      expect(await where.textContent()).toContain('gelatin (6 g)');
      expect(await where.getByRole('link', { name: 'Trace PDF' }).getAttribute('href')).toBe(`/api/batches/${made.batchId}/trace.pdf`);
      await shot(page, 'batch-trace');

      // The tap board shows the beer's notes too.
      await page.goto('/kegs/tap-board');
      const tap = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: made.tapCode, exact: true }) });
      await tap.getByText('Not vegan').waitFor();
      expect(await tap.textContent()).toContain('gluten (barley)');
    });
  });

  it('lets the admin set the shelf life and a style’s days in Settings', async () => {
    await asSignedIn(browser, server.url, 'admin@example.org', async (page) => {
      await page.goto('/settings#shelf_life');
      const form = page.getByRole('form', { name: 'Shelf life' });
      await form.waitFor();
      expect(await form.getByLabel('Shelf life (days)').inputValue()).toBe('60');
      await form.getByLabel('Shelf life (days)').fill('50');
      await form.getByRole('button', { name: 'Add a style' }).click();
      await form.getByLabel('Style').last().fill('Best bitter');
      await form.getByLabel('Days').last().fill('30');
      await form.getByRole('button', { name: 'Save the shelf life' }).click();
      await form.getByText('Shelf life saved').waitFor();
      const row = await ctx.db.selectFrom('setting').select('value').where('key', '=', 'shelf_life').executeTakeFirstOrThrow();
      expect(row.value).toMatchObject({ defaultDays: 50, nearDays: 7 });
      expect((row.value as { byStyle: unknown[] }).byStyle).toContainEqual({ style: 'Best bitter', days: 30 });
      fs.mkdirSync(shotsDir, { recursive: true });
      await form.screenshot({ path: path.join(shotsDir, 'shelf-life-settings.png') });
    });
  });
});
