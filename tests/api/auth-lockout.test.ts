import { sql } from 'kysely';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../backend/app.ts';
import { createMember } from '../../db/factories/index.ts';
import { createTestContext, DEMO_PASSWORD, linkFrom, type TestContext } from '../helpers/context.ts';

// Ten wrong passwords per account and address (the default); the account itself locks at twenty from all
// addresses together here (a hundred by default), to keep the test short.
const lockAt = 20;
let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext({ TRUST_PROXY: '1', LOGIN_LOCK_PER_ACCOUNT: String(lockAt) });
});
afterAll(async () => ctx?.close());

/** A sign-in from `ip`, as a proxy in front of the app reports it. */
const signInFrom = (ip: string, email: string, password: string, app = ctx.app) =>
  request(app).post('/api/auth/login').set('X-Forwarded-For', ip).send({ email, password });

async function wrongPasswords(email: string, ip: string, times: number, app = ctx.app): Promise<number[]> {
  const statuses: number[] = [];
  for (let i = 0; i < times; i++) statuses.push((await signInFrom(ip, email, 'not-the-password', app)).status);
  return statuses;
}

const mailsTo = async (email: string, subject: RegExp) =>
  (
    await ctx.db
      .selectFrom('dev_mail_message')
      .select(['subject'])
      .where(sql<boolean>`${email} = any(mail_to)`)
      .execute()
  ).filter((m) => subject.test(m.subject)).length;

describe('throttling per account and address', () => {
  it('10 wrong passwords from one address throttle that address only: the owner signs in from another', async () => {
    const member = await createMember(ctx.db);
    expect(await wrongPasswords(member.email, '203.0.113.10', 10)).toEqual(Array(10).fill(401));
    // The eleventh try from there waits, even with the right password.
    const throttled = await signInFrom('203.0.113.10', member.email, DEMO_PASSWORD);
    expect(throttled.status).toBe(429);
    expect(throttled.headers['content-type']).toMatch(/problem\+json/);
    expect(throttled.body.title).toBe('Too many attempts');
    const retryAfter = Number(throttled.headers['retry-after']);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(15 * 60);
    // The owner, elsewhere, is not locked out; nor is anyone else at the throttled address.
    const owner = await signInFrom('198.51.100.77', member.email, DEMO_PASSWORD);
    expect(owner.status).toBe(200);
    expect(owner.body.user.email).toBe(member.email);
    const neighbour = await createMember(ctx.db);
    expect((await signInFrom('203.0.113.10', neighbour.email, DEMO_PASSWORD)).status).toBe(200);
    // No lock, so no mail.
    expect(await mailsTo(member.email, /Unlock/)).toBe(0);
  });

  it('keeps the counters across a restart: a new app on the same database still throttles', async () => {
    const member = await createMember(ctx.db);
    expect(await wrongPasswords(member.email, '203.0.113.20', 10)).toEqual(Array(10).fill(401));
    const restarted = createApp(ctx.deps);
    const after = await signInFrom('203.0.113.20', member.email, DEMO_PASSWORD, restarted);
    expect(after.status).toBe(429);
    expect(Number(after.headers['retry-after'])).toBeGreaterThan(0);
    expect((await signInFrom('203.0.113.21', member.email, DEMO_PASSWORD, restarted)).status).toBe(200);
  });

  it('a right password clears its own address’s count', async () => {
    const member = await createMember(ctx.db);
    expect(await wrongPasswords(member.email, '203.0.113.30', 9)).toEqual(Array(9).fill(401));
    expect((await signInFrom('203.0.113.30', member.email, DEMO_PASSWORD)).status).toBe(200);
    expect(await wrongPasswords(member.email, '203.0.113.30', 10)).toEqual(Array(10).fill(401));
    expect((await signInFrom('203.0.113.30', member.email, DEMO_PASSWORD)).status).toBe(429);
  });

  it('throttles an unknown address exactly like a known one', async () => {
    const statuses = await wrongPasswords('nobody-here@example.org', '203.0.113.40', 11);
    expect(statuses).toEqual([...Array(10).fill(401), 429]);
  });
});

describe('locking an account', () => {
  it('locks after the threshold from many addresses, mails the owner one unlock link that works once', async () => {
    const member = await createMember(ctx.db);
    const addresses = ['192.0.2.1', '192.0.2.2'];
    for (const ip of addresses) expect(await wrongPasswords(member.email, ip, lockAt / addresses.length)).toEqual(Array(lockAt / 2).fill(401));

    // Locked everywhere now, the right password and a fresh address included.
    const locked = await signInFrom('192.0.2.99', member.email, DEMO_PASSWORD);
    expect(locked.status).toBe(429);
    expect(locked.body.title).toBe('Account locked');
    expect(Number(locked.headers['retry-after'])).toBeGreaterThan(0);
    expect(Number(locked.headers['retry-after'])).toBeLessThanOrEqual(60 * 60);
    // Refused tries do not count further, and the lock survives a restart.
    expect((await signInFrom('192.0.2.100', member.email, 'not-the-password', createApp(ctx.deps))).status).toBe(429);

    const mail = await ctx.waitForMail(member.email, /Unlock/);
    expect(mail.text_body).toContain(`${lockAt} failed attempts`);
    const { url, token } = linkFrom(mail.text_body);
    expect(url).toMatch(/\/unlock\?token=/);
    // Stored hashed, expiring, single use.
    const stored = await ctx.db.selectFrom('user_token').selectAll().where('purpose', '=', 'account_unlock').where('user_id', '=', member.id).execute();
    expect(stored).toHaveLength(1);
    expect(stored[0]!.token_hash).not.toContain(token);
    expect(new Date(stored[0]!.expires_at).getTime()).toBeGreaterThan(ctx.clock.now().getTime());

    const unlocked = await request(ctx.app).post('/api/auth/unlock').send({ token });
    expect(unlocked.status).toBe(204);
    expect((await signInFrom('192.0.2.1', member.email, DEMO_PASSWORD)).status).toBe(200);
    const again = await request(ctx.app).post('/api/auth/unlock').send({ token });
    expect(again.status).toBe(410);
    expect(again.headers['content-type']).toMatch(/problem\+json/);

    // One mail per lock, however many tries were refused; the trail shows the lock and its lifting.
    expect(await mailsTo(member.email, /Unlock/)).toBe(1);
    const trail = await ctx.db.selectFrom('audit_log').select('action').where('subject_id', '=', member.id).orderBy('id').execute();
    expect(trail.map((a) => a.action)).toEqual(expect.arrayContaining(['sign_in_locked', 'sign_in_unlocked', 'signed_in']));
  });

  it('a new password from the reset link lifts a lock too; an unknown or bad unlock token changes nothing', async () => {
    const member = await createMember(ctx.db);
    for (const ip of ['192.0.2.11', '192.0.2.12']) await wrongPasswords(member.email, ip, lockAt / 2);
    expect((await signInFrom('192.0.2.13', member.email, DEMO_PASSWORD)).status).toBe(429);
    await ctx.waitForMail(member.email, /Unlock/);

    expect((await request(ctx.app).post('/api/auth/unlock').send({ token: 'not-a-real-token' })).status).toBe(404);
    expect((await request(ctx.app).post('/api/auth/unlock').send({})).status).toBe(422);
    expect((await signInFrom('192.0.2.13', member.email, DEMO_PASSWORD)).status).toBe(429);

    expect((await request(ctx.app).post('/api/auth/password-reset').send({ email: member.email })).status).toBe(202);
    const reset = await ctx.waitForMail(member.email, /Reset/);
    const { token } = linkFrom(reset.text_body);
    expect((await request(ctx.app).post('/api/auth/password-reset/confirm').send({ token, password: 'a-new-long-password' })).status).toBe(204);
    expect((await signInFrom('192.0.2.13', member.email, 'a-new-long-password')).status).toBe(200);
  });

  it('an unlock link that expired is refused', async () => {
    const member = await createMember(ctx.db);
    for (const ip of ['192.0.2.21', '192.0.2.22']) await wrongPasswords(member.email, ip, lockAt / 2);
    const { token } = linkFrom((await ctx.waitForMail(member.email, /Unlock/)).text_body);
    // This one ran out long before the clock's now.
    await ctx.db
      .updateTable('user_token')
      .set({ expires_at: new Date('2000-01-01T00:00:00Z') })
      .where('user_id', '=', member.id)
      .execute();
    expect((await request(ctx.app).post('/api/auth/unlock').send({ token })).status).toBe(410);
    expect((await signInFrom('192.0.2.23', member.email, DEMO_PASSWORD)).status).toBe(429);
  });
});
