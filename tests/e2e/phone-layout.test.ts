import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { accountNav, mainNav, visibleNav, type NavEntry } from '../../frontend/config/nav.ts';
import { canOnEvery } from '../../frontend/lib/ability.tsx';
import { createBatch, createBooking, createInvoice, createKegCheckout, DAY, fillKeg, HOUR } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { nextPeriod, periodBounds } from '../../shared/billing/dates.ts';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import { closeAll, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { readingsOn } from '../helpers/cellar.ts';

// Phones: every page each role reaches fits a 360 px and a 390 px wide screen (nothing wider than the
// viewport), dialogs open inside it, and the cellar's checklists keep their buttons at touch size. The
// 390 px screenshots of each role's main screens are kept under tests/artifacts/screens/.

const screensDir = path.resolve('tests', 'artifacts', 'screens');
const sizes = [
  { width: 360, height: 780 },
  { width: 390, height: 844 },
];
const TOUCH_PX = 44;

let ctx: TestContext, server: Served, browser: Browser;

const made = {
  batchId: '',
  memberKegId: fixtureEquipmentId('K-002'),
  cleanKegId: fixtureEquipmentId('K-001'),
  fermenterId: fixtureEquipmentId('F-01'),
  invoiceId: '',
};

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now();
  const at = (ms: number) => new Date(now.getTime() + ms);
  const member = fixtureUserId('member');
  // Maren Holloway (member@): an upcoming booking to cancel, a fermenting batch, a keg at home, an invoice.
  await createBooking(ctx.db, { equipmentId: fixtureEquipmentId('F-02'), ownerId: member, startsAt: at(2 * DAY), endsAt: at(12 * DAY), now });
  const batch = await createBatch(ctx.db, {
    ownerId: member,
    name: 'Phone-sized extra special bitter with a long name',
    style: 'Extra special bitter',
    volumeLiters: 23,
    readings: readingsOn(at, [-6, 1.056], [-3, 1.022], [-1, 1.014]),
    fermenter: { equipmentId: made.fermenterId, startsAt: at(-6 * DAY - HOUR), endsAt: at(8 * DAY), now },
  });
  made.batchId = batch.id;
  await fillKeg(ctx.db, { kegId: made.memberKegId, at: at(-4 * DAY), ownerId: member });
  await createKegCheckout(ctx.db, { kegId: made.memberKegId, memberId: member, at: at(-3 * DAY), dueAt: at(11 * DAY) });
  const period = nextPeriod(now.toISOString().slice(0, 7), -1);
  const invoice = await createInvoice(ctx.db, { memberId: member, period, today: periodBounds(period).next, actorId: fixtureUserId('treasurer') });
  made.invoiceId = invoice.id;
  ({ server, browser } = await serveAndLaunch(ctx));
  fs.mkdirSync(screensDir, { recursive: true });
});
afterAll(() => closeAll(browser, server, ctx));

const accounts: { email: string; role: Role; name: string }[] = [
  { email: 'member@example.org', role: 'member', name: 'member' },
  { email: 'brewer@example.org', role: 'brewer_on_duty', name: 'brewer' },
  { email: 'treasurer@example.org', role: 'treasurer', name: 'treasurer' },
  { email: 'admin@example.org', role: 'admin', name: 'admin' },
];

const navPaths = (entries: NavEntry[]): string[] => entries.flatMap((e) => [e.to, ...navPaths(e.children ?? [])]);

/** The detail pages a role opens from its lists. */
function detailPages(role: Role): string[] {
  const ability = defineAbilityFor({ id: role === 'member' ? fixtureUserId('member') : 'x', roles: [role] });
  const pages = [`/cellar/${made.fermenterId}`];
  if (ability.can('read', 'Batch')) pages.push(`/batches/${made.batchId}`);
  if (ability.can('read', 'Keg')) pages.push(`/kegs/${made.memberKegId}`);
  if (canOnEvery(ability, 'read', 'Invoice')) pages.push(`/billing/invoices/${made.invoiceId}`);
  if (role === 'member') pages.push(`/billing/my-invoices/${made.invoiceId}`);
  if (ability.can('create', 'SanitationCycle')) pages.push(`/sanitation/new?equipmentId=${made.cleanKegId}`, `/kegs/${made.cleanKegId}`);
  if (ability.can('create', 'Transfer')) pages.push(`/transfers/new?batchId=${made.batchId}`);
  return pages;
}

async function settled(page: Page) {
  await page.waitForLoadState('networkidle', { timeout: 10_000 }).catch(() => undefined);
  await expect.poll(() => page.locator('main svg.animate-spin').count(), { timeout: 10_000 }).toBe(0);
}

/** Null when the page fits; else how wide it is and the outermost elements that stick out. */
function overflow(page: Page) {
  return page.evaluate(() => {
    const width = window.innerWidth;
    const scrollWidth = document.documentElement.scrollWidth;
    if (scrollWidth <= width) return null;
    const sticksOut = (e: Element) => e.getBoundingClientRect().right > width + 0.5;
    const wide = [...document.querySelectorAll('body *')]
      .filter((e) => sticksOut(e) && !(e.parentElement && sticksOut(e.parentElement)))
      .slice(0, 4)
      .map((e) => `<${e.tagName.toLowerCase()} class="${String(e.getAttribute('class') ?? '').slice(0, 80)}"> ${(e.textContent ?? '').trim().slice(0, 40)}`);
    return { scrollWidth, width, wide };
  });
}

/** The visible buttons (and checkbox rows) in the main area lower than a thumb needs. */
function smallTargets(page: Page, selector: string) {
  return page.evaluate(
    ({ selector, min }) =>
      [...document.querySelectorAll(selector)]
        .filter((e) => (e as HTMLElement).offsetParent !== null && !(e as HTMLButtonElement).disabled)
        .map((e) => ({
          text: (e.textContent ?? '').trim().slice(0, 40) || e.getAttribute('aria-label') || e.tagName,
          height: e.getBoundingClientRect().height,
        }))
        .filter((b) => b.height < min - 0.5),
    { selector, min: TOUCH_PX },
  );
}

const screenNames: Record<string, string> = { '/': 'today', '/cellar': 'cellar', '/bookings': 'bookings', '/kegs': 'kegs', '/billing': 'billing' };

describe('phone layout', { timeout: 120_000 }, () => {
  for (const account of accounts) {
    for (const size of sizes) {
      it(`${account.name} at ${size.width}×${size.height}: no page wider than the screen, dialogs inside it, touch-sized checklists`, async () => {
        const ability = defineAbilityFor({ id: 'x', roles: [account.role] });
        const start = [...navPaths(visibleNav(mainNav, ability)), ...navPaths(visibleNav(accountNav, ability)), ...detailPages(account.role)];
        const queue = [...new Set(start)];
        const seen = new Set(queue);
        const problems: string[] = [];
        await asSignedIn(browser, server.url, account.email, { viewport: size }, async (page) => {
          for (let i = 0; i < queue.length; i++) {
            const where = queue[i]!;
            await page.goto(where);
            await page.locator('main').waitFor();
            await settled(page);
            const wide = await overflow(page);
            if (wide) problems.push(`${where}: ${wide.scrollWidth} px wide at ${wide.width} px: ${wide.wide.join(' | ')}`);
            // The tabs of a section (Bookings, Kegs, Sanitation, Billing, Members) are pages too.
            const tabs = await page
              .locator('main nav[aria-label$="sections"] a')
              .evaluateAll((links) => links.map((a) => new URL((a as HTMLAnchorElement).href).pathname));
            for (const tab of tabs) {
              if (!seen.has(tab)) {
                seen.add(tab);
                queue.push(tab);
              }
            }
            const shot = screenNames[where];
            if (shot && size.width === 390) await page.screenshot({ path: path.join(screensDir, `${account.name}-${shot}.png`), fullPage: true });

            if (where.startsWith('/sanitation/new') || where.startsWith('/transfers/new') || /^\/kegs\/[0-9a-f-]{36}$/.test(where)) {
              const small = await smallTargets(
                page,
                'main button, main a[class*="min-h"], main label:has(> input[type="checkbox"]), main label:has(> input[type="radio"])',
              );
              if (small.length) problems.push(`${where}: below ${TOUCH_PX} px: ${small.map((b) => `${b.text} (${b.height} px)`).join(', ')}`);
            }
          }
          // The Billing tab strip shows every tab, Exports included, inside the screen.
          if (canOnEvery(ability, 'read', 'Invoice')) {
            await page.goto('/billing');
            const exportsTab = page.locator('main nav[aria-label="Billing sections"]').getByRole('link', { name: 'Exports' });
            await exportsTab.waitFor();
            const box = (await exportsTab.boundingBox())!;
            expect(box.x).toBeGreaterThanOrEqual(0);
            expect(box.x + box.width).toBeLessThanOrEqual(size.width);
          }
          // The cancel-booking dialog opens inside the screen.
          if (ability.can('cancel', 'Booking')) {
            await page.goto(canOnEvery(ability, 'readOwner', 'Booking') ? '/bookings/all' : '/bookings/mine');
            await page.getByRole('button', { name: /^Cancel F-02/ }).click();
            const dialog = page.getByRole('dialog', { name: 'Cancel this booking?' });
            await dialog.waitFor();
            const box = (await dialog.boundingBox())!;
            expect(box.x).toBeGreaterThanOrEqual(0);
            expect(box.y).toBeGreaterThanOrEqual(0);
            expect(box.x + box.width).toBeLessThanOrEqual(size.width);
            expect(box.y + box.height).toBeLessThanOrEqual(size.height);
            expect(await overflow(page)).toBeNull();
            if (size.width === 390) await page.screenshot({ path: path.join(screensDir, `${account.name}-cancel-booking.png`) });
            await dialog.getByRole('button', { name: 'Keep it' }).click();
          }
          expect(problems).toEqual([]);
        });
        // Every page a role reaches, at one size, in one go: the admin reaches the most (about 30).
      }, 240_000);
    }
  }

  it('wide lists become cards on a phone, with status and amount on screen', async () => {
    await asSignedIn(browser, server.url, 'treasurer@example.org', { viewport: sizes[0] }, async (page) => {
      await page.goto('/billing/invoices');
      const row = page.locator('main tbody tr').first();
      await row.waitFor();
      await settled(page);
      const cells = await row.locator('td').evaluateAll((tds) =>
        tds
          .filter((td) => (td as HTMLElement).offsetParent !== null)
          .map((td) => {
            const r = td.getBoundingClientRect();
            return { label: td.getAttribute('data-label'), left: r.left, right: r.right, text: (td.textContent ?? '').trim() };
          }),
      );
      const width = 360;
      for (const cell of cells) {
        expect(cell.left).toBeGreaterThanOrEqual(0);
        expect(cell.right).toBeLessThanOrEqual(width);
      }
      const labels = cells.map((c) => c.label);
      expect(labels).toContain('Status');
      expect(labels.some((l) => l && /total|amount|due/i.test(l))).toBe(true);
    });
  });
});
