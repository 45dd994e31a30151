import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { accountNav, mainNav, visibleNav } from '../../frontend/config/nav.ts';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import { closeAll, phone, screenshot, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext, server: Served, browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const accounts: { email: string; role: Role; name: string; never: string[]; always: string[] }[] = [
  { email: 'admin@example.org', role: 'admin', name: 'Greta Alder', never: [], always: ['Today', 'Members', 'Outbox'] },
  { email: 'treasurer@example.org', role: 'treasurer', name: 'Milo Fenwick', never: ['Members', 'Outbox'], always: ['Today'] },
  { email: 'brewer@example.org', role: 'brewer_on_duty', name: 'Ada Kettleby', never: ['Members', 'Outbox', 'Billing'], always: ['Today'] },
  { email: 'member@example.org', role: 'member', name: 'Maren Holloway', never: ['Members', 'Outbox', 'Sanitation'], always: ['Today'] },
];

const flatten = (entries: ReturnType<typeof visibleNav>): string[] => entries.flatMap((e) => [e.label, ...flatten(e.children ?? [])]);

describe('navigation by role', () => {
  for (const account of accounts) {
    it(`${account.role} signs in and sees only the navigation the shared ability allows`, async () => {
      await asSignedIn(browser, server.url, account.email, async (page) => {
        await expect.poll(() => page.getByRole('heading', { level: 1 }).first().textContent()).toContain(account.name.split(' ')[0]);
        const nav = page.getByRole('navigation', { name: /main/i });
        const labels = (await nav.getByRole('link').allTextContents()).map((t) => t.trim());
        const ability = defineAbilityFor({ id: 'x', roles: [account.role] });
        const expected = [...flatten(visibleNav(mainNav, ability)), ...flatten(visibleNav(accountNav, ability))];
        expect(labels).toEqual(expected);
        for (const label of account.always) expect(labels).toContain(label);
        for (const label of account.never) expect(labels).not.toContain(label);
        await screenshot(page, `navigation-${account.role}`);
      });
    });
  }

  it('a member typing the Members address gets no member list', async () => {
    await asSignedIn(browser, server.url, 'member2@example.org', async (page) => {
      await page.goto('/members');
      await expect.poll(async () => (await page.textContent('main')) ?? '').toMatch(/not for your role/i);
      expect(await page.getByRole('cell', { name: 'admin@example.org' }).count()).toBe(0);
    });
  });

  it('a phone shows the menu behind a button; an unknown address shows the not-found page', async () => {
    await asSignedIn(browser, server.url, 'brewer@example.org', { viewport: phone }, async (page) => {
      const menu = page.getByRole('button', { name: /menu/i });
      await menu.click();
      await expect.poll(() => page.getByRole('navigation', { name: /main/i }).getByRole('link', { name: 'Today' }).isVisible()).toBe(true);
      await screenshot(page, 'navigation-phone-menu');
      await page.goto('/no-such-screen');
      await expect.poll(async () => (await page.textContent('body')) ?? '').toMatch(/nothing at this address/i);
      await screenshot(page, 'not-found');
    });
  });
});

// A screen's data comes from its route loader, fetched while the screen's code loads: the screen
// finds it in the cache under its own query key and asks no second time.

/** Every request the page makes to `path` (exactly that path) from now on. */
function requestsTo(page: Page, path: string): URL[] {
  const seen: URL[] = [];
  page.on('request', (r) => {
    const url = new URL(r.url());
    if (url.pathname === path) seen.push(url);
  });
  return seen;
}

const kegRows = (page: Page) => page.locator('main tbody tr');

describe('route loaders', () => {
  it('a list opened by its address with page and sort asks for its rows once and shows them', { timeout: 120_000 }, async () => {
    await asSignedIn(browser, server.url, 'brewer@example.org', async (page) => {
      const kegs = requestsTo(page, '/api/kegs');
      await page.goto('/kegs?sort=code&order=desc&page=2&pageSize=5');
      // The fleet is K-001…K-012: newest code first, five a page, so page 2 holds K-007…K-003.
      await expect.poll(() => kegRows(page).count(), { timeout: 15_000 }).toBe(5);
      await expect.poll(async () => (await kegRows(page).first().textContent()) ?? '').toContain('K-007');
      await page.waitForLoadState('networkidle');
      expect(kegs).toHaveLength(1);
      expect(Object.fromEntries(kegs[0]!.searchParams)).toMatchObject({ sort: 'code', order: 'desc', page: '2', pageSize: '5' });
    });
  });

  it('going to a screen from the navigation fetches its data once; sorting asks for the new order only', { timeout: 120_000 }, async () => {
    await asSignedIn(browser, server.url, 'brewer@example.org', async (page) => {
      await page.getByRole('heading', { level: 1 }).first().waitFor();
      const kegs = requestsTo(page, '/api/kegs');
      await page.getByRole('navigation', { name: /main/i }).getByRole('link', { name: 'Kegs', exact: true }).click();
      await expect.poll(() => kegRows(page).count(), { timeout: 15_000 }).toBeGreaterThan(0);
      await page.waitForLoadState('networkidle');
      expect(kegs).toHaveLength(1);
      // Sorting is the list's own business: the loader does not run again for it.
      await page.getByRole('columnheader', { name: /keg/i }).getByRole('button').click();
      await expect.poll(() => kegs.length).toBe(2);
      await page.waitForLoadState('networkidle');
      expect(kegs).toHaveLength(2);
      expect(kegs[1]!.search).not.toBe(kegs[0]!.search);
    });
  });
});
