import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createKegCheckout, createTransfer, DAY, HOUR } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, phone, screenshot, signedInPage, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { readingsOn } from '../helpers/cellar.ts';

let ctx: TestContext, server: Served, browser: Browser;

const keg = (code: string) => ({ id: fixtureEquipmentId(code), code });

// What the tests work on and look at, made in beforeAll and dated from the test clock.
const made = {
  /** A batch fermenting in F-01 (bottom valve), ready to transfer. */
  batch: { id: '', name: 'Cellar round bitter', fermenter: 'F-01' },
  /** A keg needing cleaning, in the cellar (no cycle on record). */
  keg: keg('K-001'),
  /** Filled kegs on taps T-1…T-3 (T-4 free). */
  tapped: [keg('K-004'), keg('K-005'), keg('K-006')],
  /** Kegs out with members, due back 3, 6, 10 and 15 days ago; and one due in a week. */
  overdue: [
    { ...keg('K-007'), member: 'member2', daysLate: 3 },
    { ...keg('K-008'), member: 'member3', daysLate: 6 },
    { ...keg('K-009'), member: 'member4', daysLate: 10 },
    { ...keg('K-010'), member: 'member6', daysLate: 15 },
  ],
  notDue: { ...keg('K-011'), member: 'member' },
};

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const at = (ms: number) => new Date(now + ms);
  const brewer = fixtureUserId('brewer');

  const fermenting = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: made.batch.name,
    style: 'Best bitter',
    volumeLiters: 21,
    targetOg: 1.044,
    targetFg: 1.01,
    readings: readingsOn(at, [-12, 1.044], [-8, 1.018], [-4, 1.011], [-1, 1.011]),
    fermenter: { equipmentId: fixtureEquipmentId(made.batch.fermenter), startsAt: at(-12 * DAY - HOUR), endsAt: at(3 * DAY), now: at(0) },
  });
  made.batch.id = fermenting.id;

  // A pale ale packaged five days ago into three kegs now in the cold room, then tapped by the brewer
  // on duty through the API.
  const pale = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member5'),
    name: 'House pale',
    style: 'Pale ale',
    volumeLiters: 60,
    readings: readingsOn(at, [-20, 1.048], [-10, 1.01], [-7, 1.01]),
  });
  await createTransfer(ctx.db, {
    batchId: pale.id,
    fromEquipmentId: fixtureEquipmentId('F-03'),
    kegIds: made.tapped.map((k) => k.id),
    at: at(-5 * DAY),
    volumeLiters: 56,
    lossLiters: 2,
    whereabouts: 'cold_room',
    recordedBy: brewer,
  });
  const api = await ctx.signIn('brewer@example.org');
  for (const [i, k] of made.tapped.entries()) {
    const res = await api.post(`/api/kegs/${k.id}/move`, { to: 'cold_room', tapId: fixtureEquipmentId(`T-${i + 1}`) });
    if (res.status !== 200) throw new Error(`could not tap ${k.code}: ${res.status} ${JSON.stringify(res.body)}`);
  }

  // A porter packaged six weeks ago; its kegs went home with members a month ago.
  const porter = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member3'),
    name: 'Robust porter',
    style: 'Porter',
    volumeLiters: 100,
    readings: readingsOn(at, [-60, 1.058], [-50, 1.016], [-46, 1.016]),
  });
  const out = [...made.overdue, made.notDue];
  await createTransfer(ctx.db, {
    batchId: porter.id,
    fromEquipmentId: fixtureEquipmentId('F-04'),
    kegIds: out.map((k) => k.id),
    at: at(-42 * DAY),
    recordedBy: brewer,
  });
  for (const k of made.overdue) {
    await createKegCheckout(ctx.db, { kegId: k.id, memberId: fixtureUserId(k.member), at: at(-30 * DAY), dueAt: at(-k.daysLate * DAY), actorId: brewer });
  }
  await createKegCheckout(ctx.db, {
    kegId: made.notDue.id,
    memberId: fixtureUserId(made.notDue.member),
    at: at(-2 * DAY),
    dueAt: at(7 * DAY),
    actorId: brewer,
  });

  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

async function signInOnPhone(email: string): Promise<Page> {
  const { page } = await signedInPage(browser, server.url, email, { viewport: phone, context: { hasTouch: true, isMobile: true } });
  return page;
}

/** Every visible button and checkbox row on the page is at least 48 px tall. */
async function smallTargets(page: Page, scope: string): Promise<string[]> {
  return page
    .locator(`${scope} button:visible, ${scope} label:has(input[type=checkbox]):visible, ${scope} label:has(input[type=radio]):visible`)
    .evaluateAll((els) => els.filter((el) => el.getBoundingClientRect().height < 47.5).map((el) => (el.textContent ?? '').trim().slice(0, 40)));
}

describe('the brewer on duty in the cellar, on a phone', { timeout: 180_000 }, () => {
  it('records a sanitation cycle on a keg from its label page, then a transfer into it', async () => {
    // A keg that needs cleaning, in the cellar; a batch still in its fermenter.
    const { keg, batch } = made;
    const before = await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow();
    expect(before.state).toBe('needs_cleaning');

    const page = await signInOnPhone('brewer@example.org');

    // The keg's QR label opens its page; the brewer starts a cycle from there.
    await page.goto(`/cellar/${keg.id}`);
    await page
      .getByRole('heading', { name: new RegExp(keg.code) })
      .first()
      .waitFor();
    await page.getByRole('link', { name: 'Record a cycle' }).click();
    await page.waitForURL(`**/sanitation/new?equipmentId=${keg.id}`);
    await page.getByRole('heading', { name: `Clean ${keg.code}` }).waitFor();
    await screenshot(page, 'cellar-phone-1-cycle-checklist');
    expect(await smallTargets(page, 'main')).toEqual([]);

    // Clean (the co-op's alkaline cleaner, an hour's soak), rinse, sanitize, purge: each marked done, with
    // the time it began (the checklist holds each contact time to the gap before the next step).
    const began = (step: string, minutesAgo: number) =>
      page
        .locator(`li[aria-labelledby="step-${step}-title"]`)
        .getByLabel('When')
        .fill(new Date(ctx.clock.now().getTime() - minutesAgo * 60_000).toISOString().slice(0, 16));
    await page.getByRole('button', { name: 'Mark clean done' }).click();
    await began('clean', 90);
    await page.getByRole('button', { name: 'Mark rinse done' }).click();
    await began('rinse', 25);
    await page.getByText(/cleaned but not ready/).waitFor();
    await page.getByRole('button', { name: 'Mark sanitize done' }).click();
    await began('sanitize', 10);
    await page.getByRole('button', { name: 'Mark purge done' }).click();
    await began('purge', 5);
    await page.getByText('The vessel will be ready to fill.').waitFor();
    await screenshot(page, 'cellar-phone-2-cycle-complete');
    await page.getByRole('button', { name: 'Save cycle' }).click();
    await page.getByRole('heading', { name: new RegExp(`Cycle saved: ${keg.code} is now`) }).waitFor();
    expect(await page.getByText(/Ready until/).count()).toBe(1);
    await screenshot(page, 'cellar-phone-3-cycle-saved');

    const stored = await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow();
    expect(stored.state).toBe('ready');
    const cycle = await ctx.db
      .selectFrom('sanitation_cycle')
      .select(['id', 'outcome', 'recorded_by'])
      .where('equipment_id', '=', keg.id)
      .orderBy('created_at', 'desc')
      .executeTakeFirstOrThrow();
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
    const fill = await ctx.db
      .selectFrom('keg_fill')
      .select(['batch_id', 'volume_liters', 'sanitation_cycle_id'])
      .where('keg_id', '=', keg.id)
      .where('emptied_at', 'is', null)
      .executeTakeFirstOrThrow();
    expect(fill).toMatchObject({ batch_id: batch.id, sanitation_cycle_id: cycle.id });
    expect(Number(fill.volume_liters)).toBeCloseTo(18.7, 2);
    const transfer = await ctx.db
      .selectFrom('transfer')
      .select(['finings_kind', 'finings_amount', 'loss_liters'])
      .where('batch_id', '=', batch.id)
      .executeTakeFirstOrThrow();
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
    const taps = page.getByRole('list', { name: 'Taps' });
    await taps.waitFor();
    // T-1…T-3 carry the pale ale's kegs, T-4 is free.
    for (const [i, k] of made.tapped.entries()) {
      const tap = taps.getByRole('listitem').filter({ has: page.getByRole('heading', { name: `T-${i + 1}` }) });
      await tap.getByRole('link', { name: k.code }).waitFor();
      expect(await tap.innerText()).toMatch(/On tap[\s\S]*House pale/);
    }
    expect(await taps.getByText('On tap').count()).toBe(3);
    expect(
      await taps
        .getByRole('listitem')
        .filter({ has: page.getByRole('heading', { name: 'T-4' }) })
        .innerText(),
    ).toMatch(/Free/);
    await screenshot(page, 'cellar-phone-7-tap-board');
    await page.getByRole('link', { name: 'Overdue' }).click();
    const overdue = page.getByRole('list', { name: 'Overdue kegs' });
    await overdue.waitFor();
    // The four kegs past their due date, each as many days late as the server's today says; the one due next week is not there.
    expect(await overdue.getByText(/days late/).count()).toBe(4);
    for (const k of made.overdue) {
      const item = overdue.getByRole('listitem').filter({ has: page.getByRole('link', { name: k.code, exact: true }) });
      expect(await item.innerText()).toMatch(new RegExp(`${k.daysLate} days late · Robust porter`));
    }
    expect(await overdue.getByRole('link', { name: made.notDue.code, exact: true }).count()).toBe(0);
    await screenshot(page, 'cellar-phone-8-overdue');
    await page.context().close();
  });

  it('checks the tap’s line in the carbonation planner, with a line type that fills the resistance', async () => {
    const page = await signInOnPhone('brewer@example.org');
    const [k] = made.tapped;
    await page.goto(`/kegs/${k!.id}/carbonation`);
    await page.getByLabel('Target CO2 (volumes)').fill('2.4');
    // T-1: 1.7 m of 3/16" vinyl, 0.6 m rise; the common-practice figure balances about 1.75 m at 2.4 volumes and 3 °C.
    const lineType = page.getByLabel('Line type');
    await lineType.waitFor();
    expect(await lineType.inputValue()).toBe('vinyl-3/16');
    const resistance = page.getByLabel(/Line resistance/);
    expect(await resistance.inputValue()).toBe('31.1');
    const plan = page.getByRole('region', { name: 'Plan' });
    await plan.getByText(/line suits this pressure/).waitFor();
    // Polyethylene of the same bore resists more (2.2 psi/ft, 49.8 kPa/m): the same line is now too long.
    await lineType.selectOption('polyethylene-3/16');
    expect(await resistance.inputValue()).toBe('49.8');
    await plan.getByText(/too long/).waitFor();
    // A measured figure overrides the type's.
    await resistance.fill('31');
    await plan.getByText(/line suits this pressure/).waitFor();
    await screenshot(page, 'cellar-phone-9-line-balance');
    await page.context().close();
  });
});
