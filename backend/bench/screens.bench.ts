// Screens: how much JavaScript the first page loads, and how long each main page of each role's menu
// takes to be ready in headless Chromium on loopback (no request in flight, the main area showing its
// content and no spinner). Prints figures against the targets; not a test.
//
// Parameters (environment):
//   BENCH_SCREENS_DATABASE  `benchmark` (default): a copy of the benchmark data set (backend/bench/dataset.ts);
//                           `demo`: a fresh database with the seeded demo co-op only;
//                           a postgres:// URL: an existing database (say the benchmark data set) used as it is.
//   BENCH_SCREENS_RUNS      visits of each page per role (default 3); the median and the maximum are printed.
//   BENCH_SCREENS_BUILD     `0` to use dist/app as it is instead of building it first.
//   BENCH_SCREENS_PORT      the app's port (default 4310).
//   BENCH_SCREENS_ONLY      a comma-separated list of addresses (`/bookings,/batches`): only those pages.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import zlib from 'node:zlib';
import { chromium, type Browser, type Page } from 'playwright-core';
import { createApp } from '../app.ts';
import { loadConfig } from '../config/env.ts';
import { createDb, type Database } from '../db/database.ts';
import { systemClock } from '../lib/clock.ts';
import { createQueue } from '../lib/queue.ts';
import { accountNav, mainNav, visibleNav, type NavEntry } from '../../frontend/config/nav.ts';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import { DEMO_PASSWORD } from '../../db/factories/common.ts';
import { benchDatabase } from './bench-db.ts';
import { benchDataset } from './dataset.ts';
import { atMost, reportTarget } from './report.ts';

const INITIAL_JS_TARGET_KB = 150;
const READY_TARGET_MS = 800;
/** No request for this long after the last one ends: the page has stopped loading. */
const QUIET_MS = 300;
const RUNS = Number(process.env.BENCH_SCREENS_RUNS ?? 3);
const ONLY = process.env.BENCH_SCREENS_ONLY?.split(',').filter(Boolean) ?? null;
const PORT = Number(process.env.BENCH_SCREENS_PORT ?? 4310);
const DATABASE = process.env.BENCH_SCREENS_DATABASE ?? 'benchmark';
const distDir = path.resolve('dist', 'app');

const accounts: { email: string; role: Role }[] = [
  { email: 'member@example.org', role: 'member' },
  { email: 'brewer@example.org', role: 'brewer_on_duty' },
  { email: 'treasurer@example.org', role: 'treasurer' },
  { email: 'admin@example.org', role: 'admin' },
];

function target(name: string, figure: number, unit: string, limit: number, extra = ''): void {
  reportTarget({
    name: `screen ${name}`,
    figure: Number(figure.toFixed(unit === 'ms' ? 0 : 1)),
    unit,
    target: limit,
    pass: atMost(figure, limit),
    note: extra.replace(/^[\s;]+/, '') || undefined,
  });
}

const gzipKB = (file: string) => zlib.gzipSync(fs.readFileSync(file)).length / 1024;

/** The JavaScript the first page loads before any screen: the entry script and the modules index.html preloads with it. */
function initialJs(): { files: string[]; kb: number } {
  const html = fs.readFileSync(path.join(distDir, 'index.html'), 'utf8');
  const files = [...html.matchAll(/<(?:script[^>]*\ssrc|link[^>]*rel="modulepreload"[^>]*\shref)="\/([^"]+\.js)"/g)].map((m) => m[1]!);
  return { files, kb: files.reduce((sum, f) => sum + gzipKB(path.join(distDir, f)), 0) };
}

/** The database to serve: a fresh demo co-op (optionally filled with the benchmark data set) or one given by URL. */
async function database(): Promise<{ url: string; db: Database; pool: ReturnType<typeof createDb>['pool']; label: string; drop(): Promise<void> }> {
  if (/^postgres(ql)?:\/\//.test(DATABASE)) {
    const { db, pool } = createDb(DATABASE, 8);
    return { url: DATABASE, db, pool, label: `existing database ${new URL(DATABASE).pathname.slice(1)}`, drop: () => db.destroy() };
  }
  if (DATABASE === 'benchmark') return { ...(await benchDataset('screens')), label: 'benchmark data set (backend/bench/dataset.ts)' };
  return { ...(await benchDatabase('screens')), label: 'seeded demo co-op' };
}

/** Tracks the page's requests in flight and when the last one ended. */
function networkWatch(page: Page) {
  let inFlight = 0;
  let lastChange = performance.now();
  const done = () => {
    inFlight = Math.max(0, inFlight - 1);
    lastChange = performance.now();
  };
  page.on('request', () => {
    inFlight++;
    lastChange = performance.now();
  });
  page.on('requestfinished', done);
  page.on('requestfailed', done);
  return {
    reset() {
      inFlight = 0;
      lastChange = performance.now();
    },
    /** Resolves with the time the network went quiet once it has stayed quiet for QUIET_MS. */
    async quiet(): Promise<number> {
      for (;;) {
        if (inFlight === 0 && performance.now() - lastChange >= QUIET_MS) return lastChange;
        await new Promise((resolve) => setTimeout(resolve, 20));
      }
    },
  };
}

/** The main area shows content and no spinner. */
async function contentShown(page: Page): Promise<number> {
  await page.waitForFunction(
    () => {
      const main = document.querySelector('main');
      return Boolean(main && main.innerText.trim().length > 0 && !main.querySelector('svg.animate-spin'));
    },
    undefined,
    { polling: 'raf', timeout: 30_000 },
  );
  return performance.now();
}

/** Milliseconds from asking for `to` until the page is ready; `how` is a fresh load of the address or a click in the menu. */
async function visit(page: Page, watch: ReturnType<typeof networkWatch>, to: string, how: 'load' | 'menu'): Promise<number> {
  watch.reset();
  const before = new URL(page.url()).pathname;
  const t0 = performance.now();
  if (how === 'load') {
    await page.goto(to, { waitUntil: 'commit' });
  } else {
    await page
      .getByRole('navigation', { name: /main|account/i })
      .locator(`a[href="${to}"]`)
      .first()
      .click();
    // A screen may send someone on (Billing sends a member to their own invoices): any new address will do.
    await page.waitForURL((u) => u.pathname !== before, { waitUntil: 'commit' });
  }
  const shown = await contentShown(page);
  const quiet = await watch.quiet();
  return Math.max(shown, quiet) - t0;
}

const flatten = (entries: NavEntry[]): NavEntry[] => entries.flatMap((e) => [e, ...flatten(e.children ?? [])]);
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

// A production build whatever NODE_ENV the bench runs under (the benches run with NODE_ENV=test).
if (process.env.BENCH_SCREENS_BUILD !== '0') {
  execFileSync(path.resolve('node_modules/.bin/vite'), ['build', '--logLevel', 'warn'], { stdio: 'inherit', env: { ...process.env, NODE_ENV: 'production' } });
}
const initial = initialJs();
console.log(`screens: initial JS ${initial.files.length} files, ${initial.kb.toFixed(1)} KB gzip`);
target('initial JS', initial.kb, 'KB', INITIAL_JS_TARGET_KB, ' gzip');

const data = await database();
const queue = await createQueue(data.url);
const config = loadConfig({ NODE_ENV: 'test', DATABASE_URL: data.url, PUBLIC_URL: `http://127.0.0.1:${PORT}` });
const app = createApp({ config, db: data.db, pool: data.pool, queue, clock: systemClock });
const server = app.listen(PORT, '127.0.0.1');
await new Promise<void>((resolve, reject) => server.once('listening', () => resolve()).once('error', reject));
const baseURL = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
let browser: Browser | undefined;
const misses: string[] = [];
try {
  console.log(`screens: ${data.label}, ${RUNS} runs a page, ready = main content shown and no request for ${QUIET_MS} ms (the quiet wait not counted)`);
  browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  for (const account of accounts) {
    const context = await browser.newContext({ baseURL, viewport: { width: 1366, height: 860 } });
    const page = await context.newPage();
    const js = new Set<string>();
    page.on('request', (r) => {
      const p = new URL(r.url()).pathname;
      if (p.endsWith('.js')) js.add(p);
    });
    await page.goto('/login');
    await page.getByLabel('E-mail', { exact: true }).fill(account.email);
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: /sign in/i }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/login'));
    const watch = networkWatch(page);
    const ability = defineAbilityFor({ id: 'bench', roles: [account.role] });
    const pages = flatten([...visibleNav(mainNav, ability), ...visibleNav(accountNav, ability)]).map((e) => e.to);
    for (const to of pages.filter((p) => !ONLY || ONLY.includes(p))) {
      const loads: number[] = [];
      const menus: number[] = [];
      let firstJsKB = 0;
      for (let run = 0; run < RUNS; run++) {
        js.clear();
        loads.push(await visit(page, watch, to, 'load'));
        if (run === 0) firstJsKB = [...js].reduce((sum, f) => sum + gzipKB(path.join(distDir, f)), 0);
        // To another page (Today, or Profile from Today), then into the page from the menu.
        await visit(page, watch, to === '/' ? '/profile' : '/', 'menu');
        menus.push(await visit(page, watch, to, 'menu'));
      }
      const name = `${account.role} ${to} ready`;
      const extra = `; max ${Math.max(...loads).toFixed(0)} ms; from the menu median ${median(menus).toFixed(0)}, max ${Math.max(...menus).toFixed(0)} ms; JS ${firstJsKB.toFixed(1)} KB gzip`;
      target(name, median(loads), 'ms', READY_TARGET_MS, extra);
      if (median(loads) > READY_TARGET_MS) misses.push(name);
    }
    await context.close();
  }
  console.log(misses.length ? `screens: ${misses.length} pages over ${READY_TARGET_MS} ms` : `screens: every page ready within ${READY_TARGET_MS} ms`);
} finally {
  await browser?.close();
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await queue.stop({ graceful: false, wait: true }).catch(() => undefined);
  await data.drop();
}
