import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createBooking, createKeg, createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { closeAll, desktop, phone, signedInPage, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

// Figures on screen add up: Today's counts are their lists, chart axes never repeat or overlap a
// label, steadily falling readings get a forecast dated after now, and no raw timestamp is shown.

let ctx: TestContext, server: Served, browser: Browser;
const made = { steady: '', shortSpan: '', handovers: 0 };
const shots = '/tmp/cellarwright-figures';

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now().getTime();
  const at = (ms: number) => new Date(now + ms);
  const member = fixtureUserId('member');

  // Eight readings falling steadily, one a day; and a batch read every four hours over a day.
  made.steady = (
    await createBatch(ctx.db, {
      ownerId: member,
      name: 'Steady pale ale',
      readings: [1.052, 1.048, 1.044, 1.04, 1.036, 1.032, 1.028, 1.024].map((value, i) => ({ takenAt: at(-(8 - i) * DAY + HOUR), value })),
    })
  ).id;
  made.shortSpan = (
    await createBatch(ctx.db, {
      ownerId: member,
      name: 'Fresh saison',
      readings: [1.06, 1.058, 1.055, 1.051, 1.047, 1.044, 1.04].map((value, i) => ({ takenAt: at(-(7 - i) * 4 * HOUR), value })),
    })
  ).id;

  // Three hand-overs in the next day: one vessel ready, two not.
  for (let i = 0; i < 3; i += 1) {
    const keg = await createKeg(ctx.db);
    if (i === 0) await createSanitationCycle(ctx.db, { equipmentId: keg.id, readyAt: at(-HOUR) });
    await createBooking(ctx.db, { ownerId: member, equipmentId: keg.id, startsAt: at((3 + i * 6) * HOUR), endsAt: at(5 * DAY), now: at(0) });
  }
  made.handovers = 3;

  fs.mkdirSync(shots, { recursive: true });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

/** The x-axis tick labels of the gravity chart with their boxes (the y-axis ones are gravities, 1.0xx). */
async function xTicks(page: Page) {
  const labels = page.getByTestId('gravity-chart').locator('.recharts-cartesian-axis-tick-value');
  await labels.first().waitFor({ state: 'attached' });
  const all = await labels.evaluateAll((els) =>
    els.map((el) => {
      const r = el.getBoundingClientRect();
      return { text: el.textContent ?? '', left: r.left, right: r.right };
    }),
  );
  return all.filter((t) => !/^\d\.\d{3}$/.test(t.text));
}

function expectApart(ticks: { text: string; left: number; right: number }[]) {
  expect(ticks.length).toBeGreaterThan(1);
  expect(new Set(ticks.map((t) => t.text)).size, ticks.map((t) => t.text).join(' | ')).toBe(ticks.length);
  const sorted = [...ticks].sort((a, b) => a.left - b.left);
  for (let i = 1; i < sorted.length; i += 1)
    expect(sorted[i]!.left, `${sorted[i - 1]!.text} | ${sorted[i]!.text}`).toBeGreaterThanOrEqual(sorted[i - 1]!.right);
}

describe('figures that add up', { timeout: 120_000 }, () => {
  for (const [size, viewport] of [
    ['desktop', desktop],
    ['phone', phone],
  ] as const) {
    it(`draws chart ticks that never repeat or overlap, and forecasts steady readings (${size})`, async () => {
      const { context, page } = await signedInPage(browser, server.url, 'member@example.org', { viewport });
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      try {
        await page.goto(`/batches/${made.steady}`);
        const signal = page.getByTestId('stable-signal');
        await expect.poll(() => signal.textContent()).toMatch(/Forecast: about 1\.01\d/);
        expect(await signal.textContent()).toMatch(/straight line/);
        expect(await page.getByTestId('figure-abv').textContent()).toMatch(/ASBC\/Balling/);
        await page.screenshot({ path: path.join(shots, `chart-steady-${size}.png`), fullPage: true });
        expectApart(await xTicks(page));
        expect(errors).toEqual([]);

        await page.goto(`/batches/${made.shortSpan}`);
        await page.getByTestId('stable-signal').waitFor();
        await page.screenshot({ path: path.join(shots, `chart-day-${size}.png`), fullPage: true });
        const ticks = await xTicks(page);
        expectApart(ticks);
        // A day of readings and a forecast running days ahead: labels are days or hours, never one twice.
        for (const t of ticks) expect(t.text).toMatch(/^(\d{1,2}:\d{2}|\w{3} \d{1,2}|\d{1,2} \w{3})/);
        await page.screenshot({ path: path.join(shots, `chart-day-${size}.png`), fullPage: true });
      } finally {
        await context.close();
      }
    });
  }

  it('shows as many hand-overs as it counts on Today, at both sizes', async () => {
    for (const [size, viewport] of [
      ['desktop', desktop],
      ['phone', phone],
    ] as const) {
      await asSignedIn(browser, server.url, 'brewer@example.org', { viewport }, async (page) => {
        await page.goto('/');
        const card = page.getByRole('region', { name: 'Hand-overs in the next 24 hours' });
        await card.locator('li').first().waitFor();
        const count = Number(await card.locator('header').locator('span').last().textContent());
        expect(count).toBe(made.handovers);
        expect(await card.locator('li').count()).toBe(count);
        const clean = page.getByRole('region', { name: 'Vessels to clean' });
        const listed = await clean.locator('li').count();
        const total = Number(await clean.locator('header').locator('span').last().textContent());
        const more = Number(/and (\d+) more/.exec((await clean.textContent()) ?? '')?.[1] ?? 0);
        expect(listed - (more ? 1 : 0) + more).toBe(total);
        await page.screenshot({ path: path.join(shots, `today-brewer-${size}.png`), fullPage: true });
      });
    }
  });

  it('shows no raw timestamps on the sanitation list', async () => {
    await createSanitationCycle(ctx.db, { equipmentId: (await createKeg(ctx.db)).id, readyAt: new Date(ctx.clock.now().getTime() - 2 * HOUR) });
    await asSignedIn(browser, server.url, 'brewer@example.org', { viewport: phone }, async (page) => {
      for (const url of ['/sanitation/log', '/sanitation', '/']) {
        await page.goto(url);
        await page.getByRole('main').waitFor();
        await page.waitForLoadState('networkidle');
        const text = (await page.getByRole('main').textContent()) ?? '';
        expect(text, url).not.toMatch(/\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/);
      }
      await page.goto('/sanitation/log');
      await page.waitForLoadState('networkidle');
      await page.screenshot({ path: path.join(shots, 'sanitation-log-phone.png'), fullPage: true });
    });
  });
});
