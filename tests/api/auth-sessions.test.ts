import { sql } from 'kysely';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionStore } from '../../backend/modules/auth/session-store.ts';
import { createMember } from '../../db/factories/index.ts';
import { createTestContext, DEMO_PASSWORD, type TestContext } from '../helpers/context.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext({ TRUST_PROXY: '1' });
});
afterAll(async () => ctx?.close());

const cookies = (res: request.Response) => ([] as string[]).concat(res.headers['set-cookie'] ?? []);
const cookieNamed = (res: request.Response, name: string) => cookies(res).find((c) => c.startsWith(`${name}=`));
const sessionRows = async () => Number((await sql<{ n: string }>`select count(*) as n from session`.execute(ctx.db)).rows[0]!.n);

/** What a browser adds to a same-origin fetch. */
const fromBrowser = (r: request.Test) => r.set('Origin', 'http://127.0.0.1:3000').set('Sec-Fetch-Site', 'same-origin');

/** An anonymous visitor's token and the cookie that carries it, as a browser would hold them. */
async function anonymousToken() {
  const res = await request(ctx.app).get('/api/auth/csrf');
  const cookie = cookieNamed(res, 'cw.csrf')!.split(';')[0]!;
  return { token: res.body.token as string, cookie };
}

describe('anonymous visitors leave no session behind', () => {
  it('stores no session row for 1,000 anonymous requests: tokens, who-am-I, failed sign-ins, resets and pages', async () => {
    const before = await sessionRows();
    const { token, cookie } = await anonymousToken();
    const kinds: (() => request.Test)[] = [
      () => request(ctx.app).get('/api/auth/csrf'),
      () => request(ctx.app).get('/api/auth/me'),
      () => request(ctx.app).get('/api/auth/csrf').set('Cookie', cookie),
      () => request(ctx.app).get('/login'),
      () => request(ctx.app).get('/'),
      () => request(ctx.app).get('/unlock?token=nothing'),
      () => request(ctx.app).get('/api/no-such-thing'),
      () => request(ctx.app).post('/api/auth/logout'),
      () =>
        fromBrowser(request(ctx.app).post('/api/auth/login'))
          .set('Cookie', cookie)
          .set('X-CSRF-Token', token)
          .set('X-Forwarded-For', '198.51.100.1')
          .send({ email: 'member@example.org', password: 'not-the-password' }),
      () => request(ctx.app).post('/api/auth/login').set('X-Forwarded-For', '198.51.100.2').send({ email: 'nobody@example.org', password: 'not-the-password' }),
      () => fromBrowser(request(ctx.app).post('/api/auth/login')).send({ email: 'member@example.org', password: DEMO_PASSWORD }),
      () => request(ctx.app).post('/api/auth/password-reset').set('X-Forwarded-For', '198.51.100.3').send({ email: 'ghost@example.org' }),
    ];
    const statuses = new Map<string, Set<number>>();
    for (let i = 0; i < 1000; i += 20) {
      const batch = await Promise.all(Array.from({ length: 20 }, (_, j) => kinds[(i + j) % kinds.length]!()));
      batch.forEach((res, j) => {
        const k = String((i + j) % kinds.length);
        statuses.set(k, (statuses.get(k) ?? new Set()).add(res.status));
        expect(cookieNamed(res, 'cw.sid')).toBeUndefined();
      });
    }
    expect(await sessionRows()).toBe(before);
    // Each kind answered as it should: tokens and pages 200, who-am-I and sign-out 401, failed sign-ins 401 or
    // throttled 429, a browser's post without its token 403, reset requests 202 (or throttled).
    expect([...statuses.get('0')!]).toEqual([200]);
    expect([...statuses.get('1')!]).toEqual([401]);
    expect([...statuses.get('3')!]).toEqual([200]);
    expect([...statuses.get('7')!]).toEqual([401]);
    expect([...statuses.get('8')!].every((s) => s === 401 || s === 429)).toBe(true);
    expect([...statuses.get('10')!]).toEqual([403]);
    expect([...statuses.get('11')!].every((s) => s === 202 || s === 429)).toBe(true);

    // The count is honest: a sign-in stores exactly one.
    const signedIn = await request(ctx.app).post('/api/auth/login').send({ email: 'member2@example.org', password: DEMO_PASSWORD });
    expect(signedIn.status).toBe(200);
    expect(await sessionRows()).toBe(before + 1);
  }, 180_000);

  it('a session whose lifetime ended signs no one in, and the store prunes such rows', async () => {
    const api = await ctx.signIn('member3@example.org');
    expect((await api.get('/api/auth/me')).status).toBe(200);
    // Sessions count real elapsed time (a security lifetime, not the co-op's clock).
    await sql`update session set expire = '2000-01-01' where sess->>'userId' = ${api.user.id}`.execute(ctx.db);
    expect((await api.get('/api/auth/me')).status).toBe(401);
    const live = await ctx.signIn((await createMember(ctx.db)).email);
    // The store as any other environment builds it (tests only switch its timer off): its pruning deletes
    // the expired row and keeps the live one.
    const store = sessionStore({ pool: ctx.deps.pool, config: { ...ctx.config, NODE_ENV: 'production' } });
    try {
      await new Promise<void>((resolve, reject) => store.pruneSessions((err) => (err ? reject(err) : resolve())));
    } finally {
      store.close();
    }
    const left = await sql<{ user_id: string }>`select sess->>'userId' as user_id from session`.execute(ctx.db);
    expect(left.rows.map((r) => r.user_id)).not.toContain(api.user.id);
    expect(left.rows.map((r) => r.user_id)).toContain(live.user.id);
    expect((await live.get('/api/auth/me')).status).toBe(200);
  });
});

describe('CSRF on anonymous forms, without a session', () => {
  it('GET /api/auth/csrf answers { token } with a signed HttpOnly cookie, and keeps a valid one', async () => {
    const res = await request(ctx.app).get('/api/auth/csrf');
    expect(res.status).toBe(200);
    expect(Object.keys(res.body)).toEqual(['token']);
    expect(res.body.token).toMatch(/^[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/);
    const cookie = cookieNamed(res, 'cw.csrf')!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Strict/i);
    expect(cookieNamed(res, 'cw.sid')).toBeUndefined();
    const again = await request(ctx.app).get('/api/auth/csrf').set('Cookie', cookie.split(';')[0]!);
    expect(again.body.token).toBe(res.body.token);
    expect(cookieNamed(again, 'cw.csrf')).toBeUndefined();
    // A cookie with a forged signature is replaced, not echoed.
    const forged = await request(ctx.app).get('/api/auth/csrf').set('Cookie', 'cw.csrf=abc.def');
    expect(forged.body.token).not.toBe('abc.def');
    expect(cookieNamed(forged, 'cw.csrf')).toBeTruthy();
  });

  it('refuses a browser’s anonymous post without a valid token pair, and accepts it with one', async () => {
    const login = () => fromBrowser(request(ctx.app).post('/api/auth/login')).set('X-Forwarded-For', '198.51.100.20');
    const body = { email: 'member4@example.org', password: DEMO_PASSWORD };
    const { token, cookie } = await anonymousToken();
    const other = await anonymousToken();

    const refused = [
      await login().send(body), // no token at all
      await login().set('X-CSRF-Token', token).send(body), // no cookie
      await login().set('Cookie', cookie).send(body), // no header
      await login().set('Cookie', cookie).set('X-CSRF-Token', other.token).send(body), // another visitor's token
      await login().set('Cookie', 'cw.csrf=abc.def').set('X-CSRF-Token', 'abc.def').send(body), // not signed by us
    ];
    for (const res of refused) {
      expect(res.status).toBe(403);
      expect(res.headers['content-type']).toMatch(/problem\+json/);
      expect(res.body.title).toMatch(/CSRF/);
    }
    // Nothing happened: no session, no audit row of a sign-in.
    const user = await ctx.db.selectFrom('app_user').select(['id', 'last_login_at']).where('email', '=', body.email).executeTakeFirstOrThrow();
    expect(user.last_login_at).toBeNull();
    // So are the other anonymous forms.
    const reset = await fromBrowser(request(ctx.app).post('/api/auth/password-reset')).send({ email: body.email });
    expect(reset.status).toBe(403);
    const unlock = await fromBrowser(request(ctx.app).post('/api/auth/unlock')).send({ token: 'x' });
    expect(unlock.status).toBe(403);

    // A script or server (no Origin, no Sec-Fetch-Site) carries no visitor's cookies and signs in as the contract says;
    // but a token it does send must be right.
    expect((await request(ctx.app).post('/api/auth/login').set('X-CSRF-Token', 'forged').send(body)).status).toBe(403);

    const agent = request.agent(ctx.app);
    const t = await agent.get('/api/auth/csrf');
    const ok = await fromBrowser(agent.post('/api/auth/login')).set('X-CSRF-Token', t.body.token).send(body);
    expect(ok.status).toBe(200);
    expect(ok.body.user.email).toBe(body.email);
    // Signed in, the anonymous token no longer counts: the session's own token does.
    const stale = await fromBrowser(agent.patch('/api/auth/me')).set('X-CSRF-Token', t.body.token).send({ units: 'us' });
    expect(stale.status).toBe(403);
    const fresh = await agent.get('/api/auth/csrf');
    expect(fresh.body.token).not.toBe(t.body.token);
    const patched = await fromBrowser(agent.patch('/api/auth/me')).set('X-CSRF-Token', fresh.body.token).send({ units: 'us' });
    expect(patched.status).toBe(200);
  });

  it('still refuses every signed-in write without the session’s token, browser or not', async () => {
    const login = await request(ctx.app).post('/api/auth/login').send({ email: 'member5@example.org', password: DEMO_PASSWORD });
    const sid = cookieNamed(login, 'cw.sid')!.split(';')[0]!;
    const { token, cookie } = await anonymousToken();
    expect((await request(ctx.app).patch('/api/auth/me').set('Cookie', sid).send({ units: 'us' })).status).toBe(403);
    // An anonymous token pair does not stand in for the session's, from a browser or not.
    for (const res of [
      await request(ctx.app).patch('/api/auth/me').set('Cookie', `${sid}; ${cookie}`).set('X-CSRF-Token', token).send({ units: 'us' }),
      await fromBrowser(request(ctx.app).patch('/api/auth/me')).set('Cookie', `${sid}; ${cookie}`).set('X-CSRF-Token', token).send({ units: 'us' }),
      await request(ctx.app).post('/api/auth/logout').set('Cookie', sid),
    ]) {
      expect(res.status).toBe(403);
      expect(res.body.title).toMatch(/CSRF/);
    }
    const unchanged = await ctx.db.selectFrom('app_user').select('units').where('email', '=', 'member5@example.org').executeTakeFirstOrThrow();
    expect(unchanged.units).toBe('metric');
    const own = await request(ctx.app).get('/api/auth/csrf').set('Cookie', sid);
    expect(cookieNamed(own, 'cw.csrf')).toBeUndefined();
    expect((await request(ctx.app).get('/api/auth/me').set('Cookie', sid)).status).toBe(200);
    expect((await request(ctx.app).post('/api/auth/logout').set('Cookie', sid).set('X-CSRF-Token', own.body.token)).status).toBe(204);
  });
});
