import axe from 'axe-core';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { accountNav, mainNav, visibleNav, type NavEntry } from '../../frontend/config/nav.ts';
import { createBatch, createBooking, createInvoice, createKegCheckout, DAY, fillKeg, HOUR } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import { closeAll, newAppContext, phone, screenshot, type Served, serveAndLaunch, asSignedIn } from '../helpers/browser.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { bookFixture } from '../helpers/cellar.ts';

// Every screen a role reaches, at desktop and phone width, checked by axe-core against WCAG 2.1 A and AA.
// A violation of impact "critical" or "serious" fails the test, named by rule, page, role, size and the
// elements it was found on. Lesser findings are printed as a count by rule, not failed.

const WCAG_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];
const FAILING = new Set(['critical', 'serious']);
const sizes = { desktop: { width: 1280, height: 800 }, phone } as const;
type SizeName = keyof typeof sizes;

interface Finding {
  rule: string;
  impact: string;
  page: string;
  who: string;
  size: SizeName;
  targets: string[];
}

let ctx: TestContext, server: Served, browser: Browser;
let batchId: string;
let memberInvoiceId: string;
const kegId = fixtureEquipmentId('K-002');
const fermenterId = fixtureEquipmentId('F-03');

beforeAll(async () => {
  ctx = await createTestContext();
  const now = ctx.clock.now();
  // Maren Holloway (member@): a fermenting batch on F-01 with readings (the gravity chart), a keg of
  // another batch of hers checked out to her, a booking of F-02 and last month's invoice. Ines Farrow
  // (member3@) has F-04 booked, so members see a "Taken" booking on the calendar.
  const batch = await createBatch(ctx.db, {
    ownerId: fixtureUserId('member'),
    name: 'Checked pale ale',
    createdAt: new Date(now.getTime() - 8 * DAY),
    readings: [
      { takenAt: new Date(now.getTime() - 7 * DAY), value: 1.052 },
      { takenAt: new Date(now.getTime() - 4 * DAY), value: 1.02 },
      { takenAt: new Date(now.getTime() - DAY), value: 1.012 },
    ],
    fermenter: { equipmentId: fixtureEquipmentId('F-01'), startsAt: new Date(now.getTime() - 8 * DAY), endsAt: new Date(now.getTime() + 6 * DAY), now },
  });
  batchId = batch.id;
  await fillKeg(ctx.db, { kegId, at: new Date(now.getTime() - 3 * DAY), ownerId: fixtureUserId('member'), recordedBy: fixtureUserId('brewer') });
  await createKegCheckout(ctx.db, {
    kegId,
    memberId: fixtureUserId('member'),
    at: new Date(now.getTime() - 2 * DAY),
    dueAt: new Date(now.getTime() + 12 * DAY),
  });
  await bookFixture(ctx, 'F-02', 'member', 2, 12);
  await createBooking(ctx.db, {
    equipmentId: fixtureEquipmentId('F-04'),
    ownerId: fixtureUserId('member3'),
    startsAt: new Date(now.getTime() - HOUR),
    endsAt: new Date(now.getTime() + 9 * DAY),
    now,
  });
  const invoice = await createInvoice(ctx.db, {
    memberId: fixtureUserId('member'),
    period: '2026-11',
    today: '2026-12-01',
    actorId: fixtureUserId('treasurer'),
  });
  memberInvoiceId = invoice.id;
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

/** Waits for the screen to finish loading: no request for a moment and no spinner in the main area. */
async function settled(page: Page) {
  await page.waitForLoadState('networkidle', { timeout: 10_000 }).catch(() => undefined);
  await expect.poll(() => page.locator('main svg.animate-spin').count(), { timeout: 10_000 }).toBe(0);
}

/** Runs axe-core on the page as it is now (WCAG 2.1 A/AA) and returns what it found. */
async function check(page: Page, where: { page: string; who: string; size: SizeName }): Promise<Finding[]> {
  const loaded = await page.evaluate(() => typeof (window as unknown as { axe?: unknown }).axe !== 'undefined');
  // Evaluated rather than added as a script tag, so the app's content security policy does not apply.
  if (!loaded) await page.evaluate(axe.source);
  const results = await page.evaluate(
    (tags) => (window as unknown as { axe: typeof axe }).axe.run(document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] }),
    WCAG_TAGS,
  );
  return results.violations.map((v) => ({
    rule: v.id,
    impact: v.impact ?? 'unknown',
    ...where,
    targets: v.nodes.map((n) => n.target.map(String).join(' ')).slice(0, 8),
  }));
}

const allFindings: Finding[] = [];

function failing(findings: Finding[]): string[] {
  return findings.filter((f) => FAILING.has(f.impact)).map((f) => `${f.rule} (${f.impact}) on ${f.page} as ${f.who} at ${f.size}: ${f.targets.join(' | ')}`);
}

const navPaths = (entries: NavEntry[]): string[] => entries.flatMap((e) => [e.to, ...navPaths(e.children ?? [])]);

const accounts: { email: string; role: Role }[] = [
  { email: 'member@example.org', role: 'member' },
  { email: 'brewer@example.org', role: 'brewer_on_duty' },
  { email: 'treasurer@example.org', role: 'treasurer' },
  { email: 'admin@example.org', role: 'admin' },
];

/** The nav's screens, the section tabs each one shows, and the detail pages reachable from them. */
async function sweep(page: Page, role: Role, size: SizeName): Promise<Finding[]> {
  const ability = defineAbilityFor({ id: 'x', roles: [role] });
  const queue = [...navPaths(visibleNav(mainNav, ability)), ...navPaths(visibleNav(accountNav, ability))];
  const nav = new Set(queue);
  if (nav.has('/batches')) queue.push(`/batches/${batchId}`);
  if (nav.has('/kegs')) queue.push(`/kegs/${kegId}`);
  if (nav.has('/cellar')) queue.push(`/cellar/${fermenterId}`);
  if (role === 'member') queue.push(`/billing/my-invoices/${memberInvoiceId}`);
  if (nav.has('/billing') && role !== 'member') queue.push(`/billing/invoices/${memberInvoiceId}`);
  if (ability.can('create', 'SanitationCycle')) queue.push('/sanitation/new');
  if (ability.can('create', 'Transfer')) queue.push('/transfers/new');
  const seen = new Set<string>();
  const findings: Finding[] = [];
  while (queue.length) {
    const path = queue.shift()!;
    if (seen.has(path)) continue;
    seen.add(path);
    await page.goto(path);
    await page.locator('main').waitFor();
    await settled(page);
    // Section tabs (Bookings, Kegs, Billing, Sanitation, Members) lead to more screens of the same area.
    for (const href of await page.locator('main nav a[href]').evaluateAll((as) => as.map((a) => a.getAttribute('href') ?? ''))) {
      if (href.startsWith('/') && !seen.has(href)) queue.push(href);
    }
    findings.push(...(await check(page, { page: path, who: role, size })));
  }
  expect(seen.size).toBeGreaterThan(3);
  return findings;
}

describe('every screen meets WCAG 2.1 A/AA (no critical or serious axe finding)', { timeout: 120_000 }, () => {
  for (const size of Object.keys(sizes) as SizeName[]) {
    for (const account of accounts) {
      it(`${account.role} at ${size} size`, async () => {
        await asSignedIn(browser, server.url, account.email, { viewport: sizes[size] }, async (page) => {
          const findings = await sweep(page, account.role, size);
          allFindings.push(...findings);
          expect(failing(findings)).toEqual([]);
        });
      }, 400_000);
    }

    it(`the booking dialog opened from the calendar at ${size} size`, async () => {
      await asSignedIn(browser, server.url, 'member@example.org', { viewport: sizes[size] }, async (page) => {
        await page.goto('/bookings');
        await page.locator('.cw-booking').first().waitFor();
        await settled(page);
        // The timeline's keyboard way in on a desktop; on a phone each item of the week list has its own button.
        await page.getByRole('button', { name: size === 'phone' ? /^Book F-03/ : 'Book by dates' }).click();
        const dialog = page.getByRole('dialog', { name: 'Book equipment' });
        await dialog.waitFor();
        await screenshot(page, `a11y-booking-dialog-${size}`);
        const findings = await check(page, { page: '/bookings (booking dialog)', who: 'member', size });
        allFindings.push(...findings);
        expect(failing(findings)).toEqual([]);
      });
    });

    it(`the signed-out screens at ${size} size`, async () => {
      const context = await newAppContext(browser, server.url, { viewport: sizes[size] });
      const page = await context.newPage();
      try {
        const findings: Finding[] = [];
        for (const path of ['/login', '/forgot-password', '/reset-password?token=not-a-real-token', '/invitation?token=not-a-real-token']) {
          await page.goto(path);
          await page.locator('main, form').first().waitFor();
          await settled(page);
          findings.push(...(await check(page, { page: path, who: 'signed out', size })));
        }
        allFindings.push(...findings);
        expect(failing(findings)).toEqual([]);
      } finally {
        await context.close();
      }
    });
  }

  afterAll(() => {
    const byRule = new Map<string, number>();
    for (const f of allFindings) byRule.set(`${f.rule} (${f.impact})`, (byRule.get(`${f.rule} (${f.impact})`) ?? 0) + 1);
    const lines = [...byRule].sort((a, b) => b[1] - a[1]).map(([rule, n]) => `  ${rule}: ${n} page(s)`);
    console.log(`axe findings by rule (pages × roles × sizes):\n${lines.join('\n') || '  none'}`);
  });
});
