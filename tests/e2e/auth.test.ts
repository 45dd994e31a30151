import { sql } from 'kysely';
import type { Browser, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createMember } from '../../db/factories/index.ts';
import { closeAll, newAppContext, screenshot, type Served, serveAndLaunch } from '../helpers/browser.ts';
import { createTestContext, DEMO_PASSWORD, linkFrom, type TestContext } from '../helpers/context.ts';

const lockAt = 20;
let ctx: TestContext, server: Served, browser: Browser;

beforeAll(async () => {
  ctx = await createTestContext({ TRUST_PROXY: '1', LOGIN_LOCK_PER_ACCOUNT: String(lockAt) });
  ({ server, browser } = await serveAndLaunch(ctx));
});
afterAll(() => closeAll(browser, server, ctx));

const sessionRows = async () => Number((await sql<{ n: string }>`select count(*) as n from session`.execute(ctx.db)).rows[0]!.n);
const bodyText = async (page: Page) => (await page.textContent('body')) ?? '';

async function signInThroughForm(page: Page, email: string, password: string) {
  await page.goto('/login');
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: /sign in/i }).click();
}

describe('signing in and out in the browser', () => {
  it('the sign-in page stores no session until someone signs in; sign-out removes it again', async () => {
    const member = await createMember(ctx.db);
    const before = await sessionRows();
    const context = await newAppContext(browser, server.url);
    try {
      const page = await context.newPage();
      await page.goto('/login');
      await page.goto('/forgot-password');
      await page.goto('/login');
      expect(await sessionRows()).toBe(before);
      // A failed sign-in: its CSRF token came without a session.
      await page.getByLabel('E-mail', { exact: true }).fill(member.email);
      await page.getByLabel('Password', { exact: true }).fill('not-the-password');
      await page.getByRole('button', { name: /sign in/i }).click();
      await expect.poll(() => bodyText(page)).toMatch(/e-mail or password is wrong/i);
      expect(await sessionRows()).toBe(before);
      expect((await context.cookies()).map((c) => c.name)).toEqual(['cw.csrf']);

      await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
      await page.getByRole('button', { name: /sign in/i }).click();
      await page.waitForURL((u) => !u.pathname.startsWith('/login'));
      expect(await sessionRows()).toBe(before + 1);
      // Signed in, a write uses the session's own token.
      await page.goto('/profile');
      await page.getByLabel('Name', { exact: true }).fill('Renamed Member');
      await page.getByRole('button', { name: /save/i }).click();
      await expect.poll(() => bodyText(page)).toMatch(/saved\./i);
      const row = await ctx.db.selectFrom('app_user').select('name').where('id', '=', member.id).executeTakeFirstOrThrow();
      expect(row.name).toBe('Renamed Member');

      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL((u) => u.pathname.startsWith('/login'));
      expect(await sessionRows()).toBe(before);
    } finally {
      await context.close();
    }
  }, 120_000);

  it('resets a forgotten password through the e-mailed link, then signs in with it', async () => {
    const member = await createMember(ctx.db);
    const context = await newAppContext(browser, server.url);
    try {
      const page = await context.newPage();
      await page.goto('/forgot-password');
      await page.getByLabel('E-mail', { exact: true }).fill(member.email);
      await page.getByRole('button', { name: /send the link/i }).click();
      await expect.poll(() => bodyText(page)).toMatch(/check your e-mail/i);
      const { url } = linkFrom((await ctx.waitForMail(member.email, /Reset/)).text_body);
      await page.goto(url);
      await page.getByLabel('New password', { exact: true }).fill('a-brand-new-password');
      await page.getByLabel('Repeat the password', { exact: true }).fill('a-brand-new-password');
      await page.getByRole('button', { name: /save the new password/i }).click();
      await expect.poll(() => bodyText(page)).toMatch(/password changed/i);
      await signInThroughForm(page, member.email, 'a-brand-new-password');
      await page.waitForURL((u) => !u.pathname.startsWith('/login'));
    } finally {
      await context.close();
    }
  }, 120_000);
});

describe('a locked account', () => {
  it('tells the owner at sign-in, and the e-mailed unlock page lifts the lock once', async () => {
    const member = await createMember(ctx.db);
    for (const ip of ['192.0.2.31', '192.0.2.32']) {
      for (let i = 0; i < lockAt / 2; i++) {
        await request(ctx.app).post('/api/auth/login').set('X-Forwarded-For', ip).send({ email: member.email, password: 'not-the-password' });
      }
    }
    const context = await newAppContext(browser, server.url);
    try {
      const page = await context.newPage();
      await signInThroughForm(page, member.email, DEMO_PASSWORD);
      await expect.poll(() => bodyText(page)).toMatch(/locked after many failed attempts/i);
      await screenshot(page, 'sign-in-locked');

      const { url } = linkFrom((await ctx.waitForMail(member.email, /Unlock/)).text_body);
      await page.goto(url);
      await expect.poll(() => bodyText(page)).toMatch(/unlock your account/i);
      await screenshot(page, 'unlock-account');
      await page.getByRole('button', { name: /unlock my account/i }).click();
      await expect.poll(() => bodyText(page)).toMatch(/account unlocked/i);
      await page.getByRole('link', { name: 'Sign in', exact: true }).click();
      await signInThroughForm(page, member.email, DEMO_PASSWORD);
      await page.waitForURL((u) => !u.pathname.startsWith('/login'));

      // The same link a second time says it no longer works.
      const again = await newAppContext(browser, server.url);
      try {
        const second = await again.newPage();
        await second.goto(url);
        await second.getByRole('button', { name: /unlock my account/i }).click();
        await expect.poll(() => bodyText(second)).toMatch(/this link no longer works/i);
      } finally {
        await again.close();
      }
    } finally {
      await context.close();
    }
  }, 120_000);
});
