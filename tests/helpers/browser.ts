import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from 'playwright-core';
import type { Clock } from '../../backend/lib/clock.ts';
import type { TestContext } from './context.ts';
import { DEMO_PASSWORD } from './context.ts';

export const artifactsDir = path.resolve('test-artifacts', 'screenshots');

/** The clock of the app served at each address, so the browser's clock can agree with the server's. */
const servedClocks = new Map<string, Clock>();

/** Closes what a browser test file opened, in the order given (browser, server, test context); one a failed set-up never made is skipped. */
export async function closeAll(...opened: ({ close(): Promise<unknown> } | undefined)[]): Promise<void> {
  for (const o of opened) await o?.close();
}

/** Serves the test context's app (API + built front end) on a free loopback port. */
export async function serve(ctx: TestContext): Promise<{ url: string; close(): Promise<void> }> {
  if (!fs.existsSync(path.resolve('dist', 'app', 'index.html'))) throw new Error('dist/app/ is missing: `npm test` builds it (or run `npx vite build`)');
  const server = ctx.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  ctx.config.publicUrl = url;
  servedClocks.set(url, ctx.clock);
  return {
    url,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** Debian's Chromium, headless, with no background traffic. */
export type Served = Awaited<ReturnType<typeof serve>>;

/** The app served on the context and a browser, started side by side. */
export async function serveAndLaunch(ctx: TestContext): Promise<{ server: Served; browser: Browser }> {
  const [server, browser] = await Promise.all([serve(ctx), launchBrowser()]);
  return { server, browser };
}

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export const phone = { width: 390, height: 844 };
export const desktop = { width: 1366, height: 860 };

/**
 * A new browser context on the app at `baseUrl` (UTC unless told otherwise, so dates on screen are
 * stable) whose clock starts where the server's clock is now and runs on, so "today" on screen is the
 * server's today whatever the machine's date.
 */
export async function newAppContext(browser: Browser, baseUrl: string, options: BrowserContextOptions = {}): Promise<BrowserContext> {
  const context = await browser.newContext({ baseURL: baseUrl, timezoneId: 'UTC', ...options });
  const clock = servedClocks.get(baseUrl);
  if (clock) await context.clock.install({ time: clock.now() });
  return context;
}

/** A new browser context (see newAppContext) signed in through the sign-in form. */
export async function signedInPage(
  browser: Browser,
  baseUrl: string,
  email: string,
  {
    viewport = desktop,
    password = DEMO_PASSWORD,
    context: extra = {},
  }: { viewport?: { width: number; height: number }; password?: string; context?: BrowserContextOptions } = {},
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await newAppContext(browser, baseUrl, { viewport, ...extra });
  const page = await context.newPage();
  await page.goto('/login');
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: /sign in/i }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/login'));
  return { context, page };
}

type PageOptions = Parameters<typeof signedInPage>[3];
type PageUse<T> = (page: Page, context: BrowserContext) => Promise<T>;

/** Runs `use` on a page signed in as `email` (see signedInPage), closing its browser context after. */
export async function asSignedIn<T>(browser: Browser, baseUrl: string, email: string, ...rest: [PageUse<T>] | [PageOptions, PageUse<T>]): Promise<T> {
  const [options, use] = rest.length === 1 ? [undefined, rest[0]] : rest;
  const { context, page } = await signedInPage(browser, baseUrl, email, options);
  try {
    return await use(page, context);
  } finally {
    await context.close();
  }
}

export async function screenshot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(artifactsDir, { recursive: true });
  const file = path.join(artifactsDir, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
