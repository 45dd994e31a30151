import { sql } from 'kysely';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createMember } from '../../db/factories/index.ts';
import { createTestContext, linkFrom, type TestContext } from '../helpers/context.ts';
import { FAR_AHEAD, laterBy, withClockAt } from '../helpers/time.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext({ LOGIN_LIMIT_PER_ACCOUNT: '5', LOGIN_LIMIT_PER_IP: '60' });
});
afterAll(async () => ctx?.close());

const sessionCookie = (res: request.Response) => ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('cw.sid='));

describe('health', () => {
  it('reports the database up', async () => {
    const res = await request(ctx.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, db: 'up' });
  });
});

describe('sign-in', () => {
  it('signs in with the demo password and returns the user and an HttpOnly, SameSite=Lax cookie', async () => {
    const res = await request(ctx.app).post('/api/auth/login').send({ email: 'Admin@Example.org', password: 'cellar-demo' });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: 'admin@example.org', name: 'Greta Alder', roles: ['admin'] });
    expect(res.body.user.id).toMatch(/^[0-9a-f-]{36}$/);
    const cookie = sessionCookie(res)!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i); // only in production
  });

  it('answers a wrong password with a 401 problem', async () => {
    const res = await request(ctx.app).post('/api/auth/login').send({ email: 'treasurer@example.org', password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({ status: 401, title: 'Sign-in failed', type: 'about:blank' });
    expect(res.body.detail).toBeTruthy();
  });

  it('answers an unknown account exactly like a wrong password', async () => {
    const res = await request(ctx.app).post('/api/auth/login').send({ email: 'nobody@example.org', password: 'whatever-it-is' });
    expect(res.status).toBe(401);
    expect(res.body.title).toBe('Sign-in failed');
  });

  it('rejects a body with missing or wrongly typed fields with 422 and per-field errors', async () => {
    const res = await request(ctx.app).post('/api/auth/login').send({ email: 42 });
    expect(res.status).toBe(422);
    expect(res.body.errors.map((e: { path: string }) => e.path).sort()).toEqual(['email', 'password']);
  });

  it('rejects malformed JSON with 400 and an oversize body with 413', async () => {
    const bad = await request(ctx.app).post('/api/auth/login').set('Content-Type', 'application/json').send('{"email":');
    expect(bad.status).toBe(400);
    expect(bad.headers['content-type']).toMatch(/problem\+json/);
    const big = await request(ctx.app)
      .post('/api/auth/login')
      .send({ email: 'a@example.org', password: 'x'.repeat(200_000) });
    expect(big.status).toBe(413);
    expect(big.body.title).toMatch(/too large/i);
  });

  it('regenerates the session id at sign-in', async () => {
    const agent = request.agent(ctx.app);
    // A session id an attacker chose for the visitor is never taken on.
    const planted = await request(ctx.app)
      .post('/api/auth/login')
      .set('Cookie', 'cw.sid=chosen-by-someone-else')
      .send({ email: 'member2@example.org', password: 'cellar-demo' });
    expect(planted.status).toBe(200);
    expect(sessionCookie(planted)).not.toMatch(/chosen-by-someone-else/);
    const before = await agent.post('/api/auth/login').send({ email: 'member2@example.org', password: 'cellar-demo' });
    const first = sessionCookie(before)!.split(';')[0];
    // Signing in again from a session that exists (as someone else, here) starts a new one.
    const { token } = (await agent.get('/api/auth/csrf')).body;
    const login = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'brewer@example.org', password: 'cellar-demo' });
    expect(login.status).toBe(200);
    const second = sessionCookie(login)!.split(';')[0];
    expect(first).toBeTruthy();
    expect(second).toBeTruthy();
    expect(second).not.toBe(first);
    // The old id no longer signs anyone in.
    const stale = await request(ctx.app).get('/api/auth/me').set('Cookie', first!);
    expect(stale.status).toBe(401);
    const me = await agent.get('/api/auth/me');
    expect(me.body.user.email).toBe('brewer@example.org');
  });

  it('throttles an account from one address after repeated failures, with 429 and Retry-After', async () => {
    const attempt = () => request(ctx.app).post('/api/auth/login').send({ email: 'member3@example.org', password: 'wrong-password' });
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await attempt()).status);
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429]);
    const res = await attempt();
    expect(res.status).toBe(429);
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
    expect(res.body.title).toBe('Too many attempts');
    // Even the right password waits out the window from this address; other accounts are not affected.
    expect((await request(ctx.app).post('/api/auth/login').send({ email: 'member3@example.org', password: 'cellar-demo' })).status).toBe(429);
    expect((await request(ctx.app).post('/api/auth/login').send({ email: 'member4@example.org', password: 'cellar-demo' })).status).toBe(200);
    // The counter lives in PostgreSQL, shared by every instance: one per account and address.
    const rows = await ctx.db
      .selectFrom('rate_limit')
      .selectAll()
      .where(sql<boolean>`starts_with(key, 'login-pair:member3@example.org ')`)
      .execute();
    expect(rows).toHaveLength(1);
    expect(rows[0]!.hits).toBeGreaterThanOrEqual(6);
  });
});

describe('CSRF and sign-out', () => {
  it('refuses a state-changing request from a signed-in session without the token', async () => {
    const api = await ctx.signIn('member@example.org');
    const res = await api.agent.patch('/api/auth/me').send({ units: 'us' });
    expect(res.status).toBe(403);
    expect(res.body.title).toMatch(/CSRF/);
    const wrong = await api.agent.patch('/api/auth/me').set('X-CSRF-Token', 'forged').send({ units: 'us' });
    expect(wrong.status).toBe(403);
    const unchanged = await ctx.db.selectFrom('app_user').select('units').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    expect(unchanged.units).toBe('metric');
    const ok = await api.patch('/api/auth/me', { units: 'us' });
    expect(ok.status).toBe(200);
    expect(ok.body.user.units).toBe('us');
  });

  it('signs out with 204 and the session is gone', async () => {
    const api = await ctx.signIn('treasurer@example.org');
    expect((await api.get('/api/auth/me')).status).toBe(200);
    expect((await api.post('/api/auth/logout')).status).toBe(204);
    const after = await api.get('/api/auth/me');
    expect(after.status).toBe(401);
    expect(after.body.title).toBe('Not signed in');
  });
});

describe('problems', () => {
  it('answers an unknown API route with a 404 problem', async () => {
    const res = await request(ctx.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({ status: 404, title: 'Not found' });
  });

  it('sends a Content-Security-Policy', async () => {
    const res = await request(ctx.app).get('/api/health');
    expect(res.headers['content-security-policy']).toMatch(/default-src 'self'/);
    expect(res.headers['content-security-policy']).toMatch(/script-src 'self'/);
  });
});

describe('invitations and password reset through the SMTP fake', () => {
  it('invites a new brewer, who follows the e-mailed link, sets a password and is signed in', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const res = await admin.post('/api/users/invitations', { email: 'new.brewer@example.org', name: 'New Brewer', roles: ['brewer_on_duty'] });
    expect(res.status).toBe(201);
    const mail = await ctx.waitForMail('new.brewer@example.org', /invited/);
    const { token } = linkFrom(mail.text_body);
    const peek = await request(ctx.app).get(`/api/auth/invitations/${token}`);
    expect(peek.body).toEqual({ email: 'new.brewer@example.org', name: 'New Brewer' });
    const agent = request.agent(ctx.app);
    const accepted = await agent.post('/api/auth/invitations/accept').send({ token, name: 'Nell Brewer', password: 'a-long-new-password' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email: 'new.brewer@example.org', name: 'Nell Brewer', roles: ['brewer_on_duty'] });
    expect((await agent.get('/api/auth/me')).body.user.email).toBe('new.brewer@example.org');
    // Single use.
    const again = await request(ctx.app).post('/api/auth/invitations/accept').send({ token, name: 'X', password: 'another-long-password' });
    expect(again.status).toBe(410);
    // And the new password works.
    expect((await request(ctx.app).post('/api/auth/login').send({ email: 'new.brewer@example.org', password: 'a-long-new-password' })).status).toBe(200);
  });

  it('refuses to invite an address that already has an account (409) and lets only an admin invite (403)', async () => {
    const admin = await ctx.signIn('admin@example.org');
    expect((await admin.post('/api/users/invitations', { email: 'member@example.org', name: 'Dup', roles: ['member'] })).status).toBe(409);
    const treasurer = await ctx.signIn('treasurer@example.org');
    const res = await treasurer.post('/api/users/invitations', { email: 'x@example.org', name: 'X', roles: ['member'] });
    expect(res.status).toBe(403);
    const none = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'x@example.org').executeTakeFirst();
    expect(none).toBeUndefined();
  });

  it('resets a password by e-mail; the link is single-use and expires; old sessions end', async () => {
    const member = await ctx.signIn('member5@example.org');
    const asked = await request(ctx.app).post('/api/auth/password-reset').send({ email: 'member5@example.org' });
    expect(asked.status).toBe(202);
    const unknown = await request(ctx.app).post('/api/auth/password-reset').send({ email: 'ghost@example.org' });
    expect(unknown.status).toBe(202); // no hint whether an account exists
    const mail = await ctx.waitForMail('member5@example.org', /Reset/);
    const { token } = linkFrom(mail.text_body);
    const short = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'short' });
    expect(short.status).toBe(422);
    const done = await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'brand-new-password-5' });
    expect(done.status).toBe(204);
    expect((await member.get('/api/auth/me')).status).toBe(401);
    expect((await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'brand-new-password-6' })).status).toBe(410);
    expect((await request(ctx.app).post('/api/auth/login').send({ email: 'member5@example.org', password: 'brand-new-password-5' })).status).toBe(200);

    // An expired link is refused.
    await request(ctx.app).post('/api/auth/password-reset').send({ email: 'member6@example.org' });
    const mail6 = await ctx.waitForMail('member6@example.org', /Reset/);
    const t6 = linkFrom(mail6.text_body).token;
    // This one ran out long before the clock's now.
    await ctx.db
      .updateTable('user_token')
      .set({ expires_at: new Date('2000-01-01T00:00:00Z') })
      .where('used_at', 'is', null)
      .execute();
    expect((await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token: t6, password: 'brand-new-password-7' })).status).toBe(410);
  });
});

describe('members administration', () => {
  it('lists users with server-side sorting, filtering and paging', async () => {
    // Members enough for two pages, and an account without the member role that the filter leaves out.
    for (const name of ['Quentin Abbot', 'Rhea Lomax', 'Sol Vance']) await createMember(ctx.db, { name });
    const treasurerOnly = await createMember(ctx.db, { name: 'Tamsin Ledger', roles: ['treasurer'] });
    const members = await ctx.db
      .selectFrom('app_user')
      .select('email')
      .where(sql<boolean>`'member' = any(roles)`)
      .orderBy('email')
      .execute();
    expect(members.length).toBeGreaterThan(5);
    const admin = await ctx.signIn('admin@example.org');
    const page1 = await admin.get('/api/users?pageSize=5&sort=email&order=asc&role=member');
    expect(page1.status).toBe(200);
    expect(page1.body.items).toHaveLength(5);
    expect(page1.body.total).toBe(members.length);
    const emails = page1.body.items.map((u: { email: string }) => u.email);
    expect([...emails].sort()).toEqual(emails);
    const page2 = await admin.get('/api/users?pageSize=5&page=2&sort=email&order=asc&role=member');
    const all = [...emails, ...page2.body.items.map((u: { email: string }) => u.email)];
    expect(all).toEqual(members.map((m) => m.email).slice(0, all.length));
    expect(all).not.toContain(treasurerOnly.email);
    const q = await admin.get('/api/users?q=kettleby');
    expect(q.body.items.map((u: { email: string }) => u.email)).toEqual(['brewer@example.org']);
    const badSort = await admin.get('/api/users?sort=password_hash');
    expect(badSort.status).toBe(422);
  });

  it('a member sees only their own row', async () => {
    const member = await ctx.signIn('member2@example.org');
    const res = await member.get('/api/users');
    expect(res.body.total).toBe(1);
    expect(res.body.items[0].email).toBe('member2@example.org');
  });

  it('assigns roles, and deactivation ends the user’s sessions', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const target = await ctx.signIn((await createMember(ctx.db)).email);
    const id = target.user.id;
    const roles = await admin.patch(`/api/users/${id}`, { roles: ['member', 'treasurer'] });
    expect(roles.status).toBe(200);
    expect(roles.body.user.roles).toEqual(['member', 'treasurer']);
    expect((await target.get('/api/auth/me')).body.user.roles).toEqual(['member', 'treasurer']);
    const off = await admin.patch(`/api/users/${id}`, { isActive: false });
    expect(off.status).toBe(200);
    expect((await target.get('/api/auth/me')).status).toBe(401);
    expect((await request(ctx.app).post('/api/auth/login').send({ email: target.user.email, password: 'cellar-demo' })).status).toBe(401);
    const trail = await admin.get(`/api/audit?subjectType=User&subjectId=${id}`);
    expect(trail.body.items.map((a: { action: string }) => a.action)).toEqual(expect.arrayContaining(['updated', 'deactivated']));
  });

  it('a member may not change roles (403) and an admin cannot lock themself out (409)', async () => {
    const member = await ctx.signIn((await createMember(ctx.db)).email);
    const res = await member.patch(`/api/users/${member.user.id}`, { roles: ['admin'] });
    expect(res.status).toBe(403);
    const admin = await ctx.signIn('admin@example.org');
    expect((await admin.patch(`/api/users/${admin.user.id}`, { isActive: false })).status).toBe(409);
  });

  it('shows the development mailbox to an admin only', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const box = await admin.get('/api/dev/mailbox');
    expect(box.status).toBe(200);
    expect(box.body.total).toBeGreaterThan(0);
    expect(box.body.items[0]).toHaveProperty('subject');
    const member = await ctx.signIn((await createMember(ctx.db)).email);
    expect((await member.get('/api/dev/mailbox')).status).toBe(403);
  });
});

describe('links follow the clock', () => {
  const HOUR = 3600_000;
  const MINUTE = 60_000;
  const tokenRow = (userId: string, purpose: 'invitation' | 'password_reset') =>
    ctx.db
      .selectFrom('user_token')
      .select(['expires_at', 'used_at'])
      .where('user_id', '=', userId)
      .where('purpose', '=', purpose)
      .orderBy('created_at', 'desc')
      .executeTakeFirstOrThrow();

  it('a reset link issued at T works until T + 1 hour by the clock, whatever the real date', async () => {
    const member = await createMember(ctx.db);
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const askFor = async () => {
        expect((await request(ctx.app).post('/api/auth/password-reset').send({ email: member.email })).status).toBe(202);
        const mail = await ctx.waitForMail(member.email, /Reset/);
        await ctx.db.deleteFrom('dev_mail_message').where('id', '=', mail.id).execute();
        return linkFrom(mail.text_body).token;
      };
      const confirm = (token: string, password: string) => request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password });

      const early = await askFor();
      expect((await tokenRow(member.id, 'password_reset')).expires_at.toISOString()).toBe(laterBy(FAR_AHEAD, HOUR));
      ctx.clock.freeze(laterBy(FAR_AHEAD, HOUR - MINUTE));
      expect((await confirm(early, 'a-password-in-time')).status).toBe(204);
      expect((await tokenRow(member.id, 'password_reset')).used_at?.toISOString()).toBe(laterBy(FAR_AHEAD, HOUR - MINUTE));

      ctx.clock.freeze(FAR_AHEAD);
      const late = await askFor();
      ctx.clock.freeze(laterBy(FAR_AHEAD, HOUR + MINUTE));
      const refused = await confirm(late, 'a-password-too-late');
      expect(refused.status).toBe(410);
      expect(refused.body.detail).toMatch(/expired/);
      // Nothing changed: the password set in time still signs in, the late one does not.
      expect((await request(ctx.app).post('/api/auth/login').send({ email: member.email, password: 'a-password-too-late' })).status).toBe(401);
      expect((await request(ctx.app).post('/api/auth/login').send({ email: member.email, password: 'a-password-in-time' })).status).toBe(200);
    });
  });

  it('an invitation issued at T is refused at T + 7 days + 1 minute and accepted at T + 7 days − 1 minute', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const email = 'late.invite@example.org';
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const invited = await admin.post('/api/users/invitations', { email, name: 'Late Invite', roles: ['member'] });
      expect(invited.status).toBe(201);
      const { token } = linkFrom((await ctx.waitForMail(email, /invited/)).text_body);
      const week = 7 * 24 * HOUR;
      expect((await tokenRow(invited.body.user.id, 'invitation')).expires_at.toISOString()).toBe(laterBy(FAR_AHEAD, week));

      ctx.clock.freeze(laterBy(FAR_AHEAD, week + MINUTE));
      expect((await request(ctx.app).get(`/api/auth/invitations/${token}`)).status).toBe(410);
      const late = await request(ctx.app).post('/api/auth/invitations/accept').send({ token, name: 'Too Late', password: 'a-long-new-password' });
      expect(late.status).toBe(410);
      expect(late.headers['content-type']).toMatch(/problem\+json/);

      ctx.clock.freeze(laterBy(FAR_AHEAD, week - MINUTE));
      expect((await request(ctx.app).get(`/api/auth/invitations/${token}`)).body).toEqual({ email, name: 'Late Invite' });
      const accepted = await request(ctx.app).post('/api/auth/invitations/accept').send({ token, name: 'In Time', password: 'a-long-new-password' });
      expect(accepted.status).toBe(200);
      expect(accepted.body.user).toMatchObject({ email, name: 'In Time' });
    });
  });
});
