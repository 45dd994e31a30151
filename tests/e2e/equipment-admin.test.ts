import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createFermenter, createTap } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext, server: Served, browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  // Besides the fixture's F-01…F-04 and T-1…T-4, a fermenter labelled F-12 and a tap labelled T-8:
  // the next free code is one past the highest (F-13, T-9), not the first gap.
  const at = ctx.clock.now();
  await createFermenter(ctx.db, { code: 'F-12', name: '60 L fermenter 12', capacityLiters: 60, at, actorId: fixtureUserId('admin') });
  await createTap(ctx.db, { code: 'T-8', name: 'Tap position 8', at, actorId: fixtureUserId('admin') });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const signIn = (email: string) => signedInPage(browser, server.url, email);

describe('the admin keeps the equipment registry', { timeout: 120_000 }, () => {
  it('adds a 60 L conical fermenter with a bottom valve, finds it in the Cellar, and edits its valve', async () => {
    const { page, context } = await signIn('admin@example.org');
    await page.goto('/cellar');
    await page.getByRole('button', { name: 'Add equipment' }).click();
    const dialog = page.getByRole('dialog', { name: 'Add equipment' });
    await dialog.waitFor();

    // Fermenter is the first kind; the next free fermenter code is suggested.
    expect(await dialog.getByLabel('Kind').inputValue()).toBe('fermenter');
    await expect.poll(() => dialog.getByLabel('Code').inputValue()).toBe('F-13');

    // A server problem lands next to its field: F-01 is taken.
    await dialog.getByLabel('Code').fill('F-01');
    await dialog.getByLabel('Name').fill('60 L conical fermenter 13');
    await dialog.getByLabel('Capacity (L)').fill('60');
    await dialog.getByLabel('Shape').selectOption('conical');
    await dialog.getByLabel('Bottom valve').check();
    await dialog.getByLabel('Notes').fill('Racking arm on the side valve.');
    await dialog.getByRole('button', { name: 'Add to the registry' }).click();
    await dialog.getByText('The code F-01 is already on another item.').waitFor();
    expect(await dialog.getByLabel('Code').getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'equipment-admin-add-code-taken');

    await dialog.getByLabel('Code').fill('F-13');
    await screenshot(page, 'equipment-admin-add-fermenter');
    await dialog.getByRole('button', { name: 'Add to the registry' }).click();
    await page.getByText('F-13 is in the registry').waitFor();
    expect(await dialog.isVisible()).toBe(false);

    const created = await ctx.db.selectFrom('equipment').selectAll().where('code', '=', 'F-13').executeTakeFirstOrThrow();
    expect(created).toMatchObject({ kind: 'fermenter', name: '60 L conical fermenter 13', state: 'needs_cleaning', notes: 'Racking arm on the side valve.' });
    expect(Number(created.capacity_liters)).toBe(60);
    expect(created.attributes).toEqual({ style: 'conical', hasValve: true });

    // The list refreshed: the new fermenter is a row of the Cellar.
    await page.getByRole('searchbox', { name: 'Search' }).fill('F-13');
    const row = page.getByRole('row').filter({ hasText: 'F-13' });
    await page.waitForURL((u) => u.searchParams.get('q') === 'F-13');
    await expect.poll(() => page.getByRole('row').count()).toBe(2); // the header and F-13
    await row.getByText('60 L conical fermenter 13').waitFor();
    await screenshot(page, 'equipment-admin-cellar-list');

    await row.getByRole('link', { name: 'F-13' }).click();
    await page.waitForURL(`**/cellar/${created.id}`);
    await page.getByRole('heading', { name: /F-13/ }).waitFor();

    await page.getByRole('button', { name: 'Edit details' }).click();
    const edit = page.getByRole('dialog', { name: 'Edit F-13' });
    await edit.waitFor();
    expect(await edit.getByLabel('Shape').inputValue()).toBe('conical');
    expect(await edit.getByLabel('Bottom valve').isChecked()).toBe(true);
    expect(await edit.getByLabel('Capacity (L)').inputValue()).toBe('60');
    await edit.getByLabel('Bottom valve').uncheck();
    await screenshot(page, 'equipment-admin-edit-valve');
    await edit.getByRole('button', { name: 'Save' }).click();
    await edit.waitFor({ state: 'hidden' });

    // The API now answers with the valve gone, the rest as it was.
    const api = await ctx.signIn('admin@example.org');
    await expect.poll(async () => (await api.get(`/api/equipment/${created.id}`)).body.equipment.attributes).toEqual({ style: 'conical', hasValve: false });
    const after = (await api.get(`/api/equipment/${created.id}`)).body.equipment;
    expect(after).toMatchObject({ code: 'F-13', capacityLiters: 60, name: '60 L conical fermenter 13' });
    // The page's details show the change.
    const details = page.locator('section').filter({ has: page.getByRole('heading', { name: 'Details' }) });
    await details.getByText('Conical').waitFor();
    await expect.poll(() => details.locator('dt:has-text("Bottom valve") + dd').textContent()).toBe('No');
    await screenshot(page, 'equipment-admin-item-edited');
    await context.close();
  });

  it('in US units the admin types a tap line in feet and inches and the API stores metres and millimetres', async () => {
    await ctx.db.updateTable('app_user').set({ units: 'us' }).where('email', '=', 'admin@example.org').execute();
    try {
      const { page, context } = await signIn('admin@example.org');
      await page.goto('/cellar');
      await page.getByRole('button', { name: 'Add equipment' }).click();
      const dialog = page.getByRole('dialog', { name: 'Add equipment' });
      await dialog.getByLabel('Kind').selectOption('tap');
      await expect.poll(() => dialog.getByLabel('Code').inputValue()).toBe('T-9');
      await dialog.getByLabel('Name').fill('Tap 9');
      await dialog.getByLabel('Position in the cold room').fill('Cold room, right wall, 1');
      // Submitting with the line left empty says so at the field.
      await dialog.getByRole('button', { name: 'Add to the registry' }).click();
      expect(await dialog.getByText('Enter a number').count()).toBe(2);
      await dialog.getByLabel('Line length (ft)').fill('10');
      await dialog.getByLabel('Line inside diameter (in)').fill('0.1875');
      await dialog.getByLabel('Rise, keg to faucet (ft)').fill('2');
      await dialog.getByLabel('Cold room temperature (°F)').fill('38');
      await screenshot(page, 'equipment-admin-add-tap-us');
      await dialog.getByRole('button', { name: 'Add to the registry' }).click();
      await page.getByText('T-9 is in the registry').waitFor();

      const tap = await ctx.db.selectFrom('equipment').selectAll().where('code', '=', 'T-9').executeTakeFirstOrThrow();
      const a = tap.attributes as Record<string, number | string>;
      expect(a.position).toBe('Cold room, right wall, 1');
      expect(a.lineLengthM).toBeCloseTo(3.048, 6); // 10 ft × 0.3048 m
      expect(a.lineInsideDiameterMm).toBeCloseTo(4.7625, 6); // 3/16 in × 25.4 mm
      expect(a.riseM).toBeCloseTo(0.6096, 6);
      expect(a.coldRoomTempC).toBeCloseTo(3.333, 2); // (38 − 32) / 1.8
      expect(tap.capacity_liters).toBeNull();

      // Opening the edit form shows feet again; saving an untouched form keeps the stored metres exactly.
      await page.goto(`/cellar/${tap.id}`);
      await page.getByRole('button', { name: 'Edit details' }).click();
      const edit = page.getByRole('dialog', { name: 'Edit T-9' });
      expect(await edit.getByLabel('Line length (ft)').inputValue()).toBe('10');
      expect(await edit.getByLabel('Line inside diameter (in)').inputValue()).toBe('0.1875');
      await edit.getByLabel('Name').fill('Tap 9, pale ale');
      await edit.getByRole('button', { name: 'Save' }).click();
      await edit.waitFor({ state: 'hidden' });
      const saved = await ctx.db.selectFrom('equipment').selectAll().where('id', '=', tap.id).executeTakeFirstOrThrow();
      expect(saved.name).toBe('Tap 9, pale ale');
      expect(saved.attributes).toEqual(tap.attributes);
      // The item page shows the line in feet.
      const details = page.locator('section').filter({ has: page.getByRole('heading', { name: 'Details' }) });
      await expect.poll(() => details.locator('dt:has-text("Line length") + dd').textContent()).toBe('10 ft');
      await screenshot(page, 'equipment-admin-tap-us-page');
      await context.close();
    } finally {
      await ctx.db.updateTable('app_user').set({ units: 'metric' }).where('email', '=', 'admin@example.org').execute();
    }
  });

  it('a member sees the Cellar without an "Add equipment" button', async () => {
    const { page, context } = await signIn('member@example.org');
    await page.goto('/cellar');
    await page.getByRole('row').filter({ hasText: 'F-01' }).first().waitFor();
    expect(await page.getByRole('button', { name: 'Add equipment' }).count()).toBe(0);
    await screenshot(page, 'equipment-admin-member-cellar');
    await context.close();
  });
});
