import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SESSION_TOUCH_EVERY_MS } from '../../backend/modules/auth/session-store.ts';
import { createMember } from '../../db/factories/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';

// What a signed-in request costs the database: the session and its person in one read, the session
// written back at most once a minute, and every guarantee kept (a deactivated person is out at once, a
// role taken away or given counts from the next request).

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => ctx?.close());

const HOUR = 3600_000;
/** The session rows of a person, with their expiry as epoch milliseconds. */
const sessionsOf = async (userId: string) =>
  (
    await sql<{ sid: string; expire_ms: number }>`
      select sid, extract(epoch from expire::timestamptz)::float8 * 1000 as expire_ms from session where sess->>'userId' = ${userId}`.execute(ctx.db)
  ).rows;
/** Sets a person's session rows to expire `msFromNow` from the database's now. */
const setExpiry = (userId: string, msFromNow: number) =>
  sql`update session set expire = (now() + ${`${msFromNow} milliseconds`}::interval)::timestamp where sess->>'userId' = ${userId}`.execute(ctx.db);

async function signedInMember(): Promise<ApiClient> {
  const m = await createMember(ctx.db, {});
  return ctx.signIn(m.email);
}

describe('the session of a signed-in request', () => {
  it('is not written back while its stored expiry is less than a minute behind', async () => {
    const api = await signedInMember();
    // As if it had just been written: twelve hours (the session's lifetime) from now.
    await setExpiry(api.user.id, 12 * HOUR);
    const [before] = await sessionsOf(api.user.id);
    for (let i = 0; i < 5; i++) expect((await api.get('/api/auth/me')).status).toBe(200);
    const [after] = await sessionsOf(api.user.id);
    expect(after!.expire_ms).toBe(before!.expire_ms);
  });

  it('is written back once its stored expiry has fallen a minute behind, so an active person stays signed in', async () => {
    const api = await signedInMember();
    await setExpiry(api.user.id, 12 * HOUR - 2 * SESSION_TOUCH_EVERY_MS);
    const [before] = await sessionsOf(api.user.id);
    expect((await api.get('/api/auth/me')).status).toBe(200);
    const [after] = await sessionsOf(api.user.id);
    expect(after!.expire_ms - before!.expire_ms).toBeGreaterThan(SESSION_TOUCH_EVERY_MS);
    expect((await api.get('/api/auth/me')).status).toBe(200);
  });

  it('still saves what a request changes in it (a CSRF token) and still signs out', async () => {
    const api = await signedInMember();
    const token = (await api.get('/api/auth/csrf')).body.token as string;
    expect(token).toBe(api.csrf);
    expect((await api.patch('/api/auth/me', { name: 'Renamed Member' })).body.user.name).toBe('Renamed Member');
    expect((await api.post('/api/auth/logout')).status).toBe(204);
    expect((await api.get('/api/auth/me')).status).toBe(401);
    expect(await sessionsOf(api.user.id)).toHaveLength(0);
  });

  it('ends at once when its person is deactivated, and its row goes', async () => {
    const api = await signedInMember();
    expect((await api.get('/api/auth/me')).status).toBe(200);
    await ctx.db.updateTable('app_user').set({ is_active: false }).where('id', '=', api.user.id).execute();
    expect((await api.get('/api/auth/me')).status).toBe(401);
    expect(await sessionsOf(api.user.id)).toHaveLength(0);
    // Active again, the old session is still gone.
    await ctx.db.updateTable('app_user').set({ is_active: true }).where('id', '=', api.user.id).execute();
    expect((await api.get('/api/auth/me')).status).toBe(401);
  });

  it('reads the person’s roles on every request: a role given or taken counts from the next one', async () => {
    const api = await signedInMember();
    expect((await api.get('/api/audit')).status).toBe(403);
    await ctx.db
      .updateTable('app_user')
      .set({ roles: ['member', 'admin'] })
      .where('id', '=', api.user.id)
      .execute();
    expect((await api.get('/api/audit')).status).toBe(200);
    expect((await api.get('/api/auth/me')).body.user.roles).toEqual(['member', 'admin']);
    await ctx.db
      .updateTable('app_user')
      .set({ roles: ['member'] })
      .where('id', '=', api.user.id)
      .execute();
    expect((await api.get('/api/audit')).status).toBe(403);
  });
});
