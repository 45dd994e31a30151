import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { accountNav, mainNav, visibleNav, type NavEntry } from '../../frontend/config/nav.ts';
import { canOnEvery } from '../../frontend/lib/ability.tsx';
import { createBatch, DAY } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import { closeAll, screenshot, signedInPage, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { bookFixture } from '../helpers/cellar.ts';

// Screens that settle: a list page stops asking the server once it has its rows, and no screen a role
// reaches sends a request that role may not make (no 4xx/5xx answer, no console error after sign-in).

let ctx: TestContext, server: Served, browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now();
  // Upcoming bookings for Maren Holloway (member@) and Ines Farrow (member3@), and a batch of Maren's.
  await bookFixture(ctx, 'F-01', 'member', 2, 12);
  await bookFixture(ctx, 'F-02', 'member3', 3, 17);
  await createBatch(ctx.db, { ownerId: fixtureUserId('member'), name: 'Quiet amber', createdAt: new Date(now.getTime() - DAY) });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const isApi = (url: string) => new URL(url).pathname.startsWith('/api/');

/** Counts the page's /api requests from now on. */
function apiRequestCounter(page: Page): { count(): number } {
  let n = 0;
  page.on('request', (r) => {
    if (isApi(r.url())) n++;
  });
  return { count: () => n };
}

/**
 * Waits until the page has stopped loading: no request in flight for a moment and no spinner in the main
 * area. A page that never stops asking fails on its spinner (or on the idle count after this).
 */
async function settled(page: Page) {
  await page.waitForLoadState('networkidle', { timeout: 10_000 }).catch(() => undefined);
  await expect.poll(() => page.locator('main svg.animate-spin').count(), { timeout: 10_000 }).toBe(0);
}

const IDLE_MS = 3000;
/** What a settled screen may still ask for in IDLE_MS (nothing polls that often). */
const IDLE_REQUESTS_MAX = 2;

describe('list pages settle', () => {
  const lists: { who: string; path: string; rows?: string }[] = [
    { who: 'member@example.org', path: '/bookings/mine', rows: 'main tr[data-booking]' },
    { who: 'brewer@example.org', path: '/bookings/all', rows: 'main tr[data-booking]' },
    { who: 'admin@example.org', path: '/bookings/all', rows: 'main tr[data-booking]' },
    { who: 'member@example.org', path: '/cellar', rows: 'main tbody tr' },
    { who: 'member@example.org', path: '/batches', rows: 'main tbody tr' },
    { who: 'brewer@example.org', path: '/kegs', rows: 'main tbody tr' },
    { who: 'treasurer@example.org', path: '/billing/invoices' },
    { who: 'member@example.org', path: '/billing/my-invoices' },
    { who: 'admin@example.org', path: '/members', rows: 'main tbody tr' },
  ];
  for (const list of lists) {
    it(`${list.path} as ${list.who} shows its rows, ends its spinner and then stays quiet`, async () => {
      await asSignedIn(browser, server.url, list.who, async (page) => {
        const requests = apiRequestCounter(page);
        await page.goto(list.path);
        if (list.rows) await page.locator(list.rows).first().waitFor();
        await settled(page);
        const before = requests.count();
        await page.waitForTimeout(IDLE_MS);
        expect(requests.count() - before).toBeLessThanOrEqual(IDLE_REQUESTS_MAX);
        expect(await page.locator('main svg.animate-spin').count()).toBe(0);
        if (list.rows) expect(await page.locator(list.rows).count()).toBeGreaterThan(0);
      });
    }, 60_000);
  }

  it('My bookings lists the member’s upcoming booking and nobody else’s', async () => {
    await asSignedIn(browser, server.url, 'member@example.org', async (page) => {
      await page.goto('/bookings/mine');
      await page.locator('main tr[data-booking]').first().waitFor();
      await settled(page);
      const text = await page.locator('main tbody').textContent();
      expect(text).toContain('F-01');
      expect(text).not.toContain('F-02');
      await screenshot(page, 'bookings-mine-settled');
    });
  });
});

const accounts: { email: string; role: Role }[] = [
  { email: 'member@example.org', role: 'member' },
  { email: 'brewer@example.org', role: 'brewer_on_duty' },
  { email: 'treasurer@example.org', role: 'treasurer' },
  { email: 'admin@example.org', role: 'admin' },
];

const navPaths = (entries: NavEntry[]): string[] => entries.flatMap((e) => [e.to, ...navPaths(e.children ?? [])]);

describe('no refused or failing request on any screen a role reaches', () => {
  for (const account of accounts) {
    it(`${account.role}: every screen in the navigation loads without a 4xx/5xx answer or a console error`, async () => {
      const ability = defineAbilityFor({ id: 'x', roles: [account.role] });
      const screens = [...navPaths(visibleNav(mainNav, ability)), ...navPaths(visibleNav(accountNav, ability))];
      // The Bookings and Billing tabs the role sees.
      if (ability.can('create', 'Booking')) screens.push('/bookings/mine');
      if (canOnEvery(ability, 'readOwner', 'Booking')) screens.push('/bookings/all');
      if (canOnEvery(ability, 'read', 'Invoice')) screens.push('/billing/invoices', '/billing/run', '/billing/prices', '/billing/exports');
      if (account.role === 'member') screens.push('/billing/my-invoices');
      expect(screens).toContain('/');

      const { context, page } = await signedInPage(browser, server.url, account.email);
      const problems: string[] = [];
      let where = '(sign-in)';
      page.on('response', (r) => {
        if (isApi(r.url()) && r.status() >= 400) problems.push(`${where}: ${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
      });
      page.on('console', (m) => {
        if (m.type() === 'error') problems.push(`${where}: console error: ${m.text()}`);
      });
      page.on('pageerror', (e) => problems.push(`${where}: page error: ${e.message}`));
      try {
        for (const path of screens) {
          where = path;
          await page.goto(path);
          await page.locator('main').waitFor();
          await settled(page).catch(() => problems.push(`${path}: still loading`));
        }
        expect(problems).toEqual([]);
      } finally {
        await context.close();
      }
    }, 180_000);
  }
});
