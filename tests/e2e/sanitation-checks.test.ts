import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKeg } from '../../db/factories/index.ts';
import { closeAll, phone, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext, server: Served, browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

/** A `datetime-local` value (the page runs in UTC) some minutes before the server's now. */
const local = (minutesAgo: number) => new Date(ctx.clock.now().getTime() - minutesAgo * 60_000).toISOString().slice(0, 16);
const stepBox = (page: Page, step: string) => page.locator(`li[aria-labelledby="step-${step}-title"]`);
/** Screenshots for looking at the screen by eye; kept out of the repository. */
const shot = (page: Page, name: string) => page.screenshot({ path: `/tmp/cw-sanitation-${name}.png`, fullPage: true });

/** A keg needing cleaning, and the brewer's phone on its new cycle. */
async function newCycleOnPhone() {
  const keg = await createKeg(ctx.db);
  await ctx.db.updateTable('equipment').set({ state: 'needs_cleaning' }).where('id', '=', keg.id).execute();
  const { page } = await signedInPage(browser, server.url, 'brewer@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
  await page.goto(`/sanitation/new?equipmentId=${keg.id}`);
  await page.getByRole('heading', { name: `Clean ${keg.code}` }).waitFor();
  return { keg, page };
}

describe('checked sanitation on a phone', { timeout: 180_000 }, () => {
  it('shows why a cycle with a weak sanitizer is refused beside the step, then records it as an exception with the reason', async () => {
    const { keg, page } = await newCycleOnPhone();

    // A caustic clean warns about CO2 and asks for the vent to be confirmed.
    await stepBox(page, 'clean').getByRole('button', { name: 'Mark clean done' }).click();
    await stepBox(page, 'clean').getByLabel('Cleaner').selectOption('caustic-cleaner');
    await stepBox(page, 'clean').getByText('Caustic: vent the CO2 first').waitFor();
    await stepBox(page, 'clean')
      .getByText(/can pull a vacuum strong enough to collapse the vessel/)
      .waitFor();
    await stepBox(page, 'clean')
      .getByText(/Caustic cleaner \(sodium hydroxide\) is caustic: vent the vessel/)
      .waitFor();
    await shot(page, '1-caustic-warning');
    await stepBox(page, 'clean')
      .getByLabel(/I vented .* to atmospheric pressure/)
      .check();
    expect(
      await stepBox(page, 'clean')
        .getByText(/is caustic: vent the vessel/)
        .count(),
    ).toBe(0);

    // The steps with their real times; the sanitizer made up far too weak.
    await stepBox(page, 'clean').getByLabel('When').fill(local(90));
    await stepBox(page, 'rinse').getByRole('button', { name: 'Mark rinse done' }).click();
    await stepBox(page, 'rinse').getByLabel('When').fill(local(50));
    await stepBox(page, 'sanitize').getByRole('button', { name: 'Mark sanitize done' }).click();
    await stepBox(page, 'sanitize')
      .getByLabel(/Strength/)
      .fill('0.2');
    await stepBox(page, 'sanitize').getByLabel('When').fill(local(20));
    await stepBox(page, 'purge').getByRole('button', { name: 'Mark purge done' }).click();
    await stepBox(page, 'purge').getByLabel('When').fill(local(10));

    // Why, beside the step.
    const why = stepBox(page, 'sanitize').getByRole('alert');
    await why.getByText('Sanitize step: 0.2 mL/L is below the working strength of Acid sanitizer (no-rinse, phosphoric) (1.2–2 mL/L).').waitFor();
    await page.getByText('This cycle cannot be saved as it stands.').waitFor();
    await shot(page, '2-weak-sanitizer');
    await page.getByRole('button', { name: 'Save cycle' }).click();
    await page.getByText(/Some steps break the co-op’s rules/).waitFor();
    expect(await ctx.db.selectFrom('sanitation_cycle').select('id').where('equipment_id', '=', keg.id).execute()).toEqual([]);

    // The server says the same when the form's own check is bypassed: the purge time that does not fit.
    await stepBox(page, 'sanitize')
      .getByLabel(/Contact time/)
      .fill('15');
    await stepBox(page, 'sanitize')
      .getByText(/15 min does not fit before the CO2 purge step, 10 min later/)
      .waitFor();
    await stepBox(page, 'sanitize')
      .getByLabel(/Contact time/)
      .fill('2');

    // Recorded as an exception, with the reason.
    await why.getByLabel('Reason to record it as an exception').fill('Last of the sanitizer; the keg is for the brewer’s own trial');
    await page.getByText('The vessel will be ready to fill.').waitFor();
    expect(await page.getByText(/Some steps break the co-op’s rules/).count()).toBe(0);
    await shot(page, '3-exception-reason');
    await page.getByRole('button', { name: 'Save cycle' }).click();
    await page.getByRole('heading', { name: new RegExp(`Cycle saved: ${keg.code} is now`) }).waitFor();
    await page
      .getByRole('list', { name: 'Recorded exceptions' })
      .getByText(/Reason given: Last of the sanitizer/)
      .waitFor();
    await shot(page, '4-saved');
    const step = await ctx.db
      .selectFrom('sanitation_step as s')
      .innerJoin('sanitation_cycle as c', 'c.id', 's.cycle_id')
      .select(['s.step', 's.concentration', 's.exception_reason', 's.exception_rules', 's.vented', 'c.outcome'])
      .where('c.equipment_id', '=', keg.id)
      .orderBy('s.position')
      .execute();
    expect(step.map((s) => s.step)).toEqual(['clean', 'rinse', 'sanitize', 'purge']);
    expect(step[0]).toMatchObject({ vented: true, exception_reason: null });
    expect(step[2]).toMatchObject({
      exception_reason: 'Last of the sanitizer; the keg is for the brewer’s own trial',
      exception_rules: ['strength_low'],
      outcome: 'ready',
    });
    expect(Number(step[2]!.concentration)).toBe(0.2);
  });

  it('lets the brewer correct the strength instead, and the Settings screen edits the working ranges', async () => {
    const { keg, page } = await newCycleOnPhone();
    await stepBox(page, 'clean').getByRole('button', { name: 'Mark clean done' }).click();
    await stepBox(page, 'clean')
      .getByLabel(/Strength/)
      .fill('0.1');
    await stepBox(page, 'clean').getByLabel('When').fill(local(30));
    await stepBox(page, 'rinse').getByRole('button', { name: 'Mark rinse done' }).click();
    await stepBox(page, 'rinse').getByLabel('When').fill(local(25));
    // 60 min soak does not fit in the 5 min before the rinse; 0.1 % is too weak.
    await stepBox(page, 'clean')
      .getByText(/0\.1 % is below the working strength/)
      .waitFor();
    await stepBox(page, 'clean')
      .getByText(/60 min does not fit before the rinse step, 5 min later/)
      .waitFor();
    await stepBox(page, 'clean').getByText('This cannot be recorded as an exception: correct it.').waitFor();
    await stepBox(page, 'clean')
      .getByLabel(/Strength/)
      .fill('1.5');
    await stepBox(page, 'clean').getByLabel('When').fill(local(100));
    expect(await stepBox(page, 'clean').getByRole('alert').count()).toBe(0);
    await page.getByRole('button', { name: 'Save cycle' }).click();
    await page.getByRole('heading', { name: new RegExp(`Cycle saved: ${keg.code} is now`) }).waitFor();

    // The admin narrows a range on the Settings screen; it is stored.
    const admin = await signedInPage(browser, server.url, 'admin@example.org', { viewport: phone, context: { hasTouch: true, isMobile: true } });
    await admin.page.goto('/settings');
    const form = admin.page.getByRole('form', { name: 'Sanitation rules' });
    await form.waitFor();
    await form.getByLabel('Minimum CO2 flush (s)').fill('25');
    const acid = form.getByRole('group', { name: 'Chemical 3' });
    await acid.getByLabel('Lowest strength').fill('1.4');
    await shot(admin.page, '5-settings');
    await form.getByRole('button', { name: 'Save sanitation rules' }).click();
    await admin.page.getByText(/Sanitation rules saved/).waitFor();
    const stored = await ctx.db.selectFrom('setting').select('value').where('key', '=', 'sanitation').executeTakeFirstOrThrow();
    const value = stored.value as { minimumPurgeSeconds: number; chemicals: { id: string; minConcentration: number }[] };
    expect(value.minimumPurgeSeconds).toBe(25);
    expect(value.chemicals.find((c) => c.id === 'acid-sanitizer')!.minConcentration).toBe(1.4);
  });
});
