import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeAll, launchBrowser, serve, signedInPage } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

// A screen's data comes from its route loader, fetched while the screen's code loads: the screen
// finds it in the cache under its own query key and asks no second time.

let ctx: TestContext;
let server: Awaited<ReturnType<typeof serve>>;
let browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext();
  server = await serve(ctx);
  browser = await launchBrowser();
});
afterAll(() => closeAll(browser, server, ctx));

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
    const { context, page } = await signedInPage(browser, server.url, 'brewer@example.org');
    try {
      const kegs = requestsTo(page, '/api/kegs');
      await page.goto('/kegs?sort=code&order=desc&page=2&pageSize=5');
      // The fleet is K-001…K-012: newest code first, five a page, so page 2 holds K-007…K-003.
      await expect.poll(() => kegRows(page).count(), { timeout: 15_000 }).toBe(5);
      await expect.poll(async () => (await kegRows(page).first().textContent()) ?? '').toContain('K-007');
      await page.waitForLoadState('networkidle');
      expect(kegs).toHaveLength(1);
      expect(Object.fromEntries(kegs[0]!.searchParams)).toMatchObject({ sort: 'code', order: 'desc', page: '2', pageSize: '5' });
    } finally {
      await context.close();
    }
  });

  it('going to a screen from the navigation fetches its data once; sorting asks for the new order only', { timeout: 120_000 }, async () => {
    const { context, page } = await signedInPage(browser, server.url, 'brewer@example.org');
    try {
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
    } finally {
      await context.close();
    }
  });
});
