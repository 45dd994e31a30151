import { execFileSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDb, type Database } from '../../backend/db/database.ts';
import { startSmtpFake, type SmtpFake } from '../../backend/fakes/smtp-fake.ts';
import { freePort, nginxBin, root, tsx } from '../../backend/scripts/lib.mjs';
import { startInstance, startLoadBalancer, type Instance, type LoadBalancer } from '../../backend/scripts/load-balancer.mjs';
import { createMember } from '../../db/factories/index.ts';
import { DEMO_PASSWORD, emptyDatabase, expectEveryMigrationOnce, hasDatabase } from '../helpers/context.ts';
import { TEST_TODAY } from '../helpers/time.ts';

// Three instances of the app on one PostgreSQL behind Debian's nginx (round robin, no sticky sessions), as a
// host would run them: started at the same moment on an empty database, each migrating on start. Whatever
// instance answers, a person stays signed in, CSRF tokens hold, sign-in limits count and queued mail goes once.

const NAMES = ['a', 'b', 'c'];
/** Wrong passwords one address may try for one account before it waits (lowered for the test). */
const PAIR_LIMIT = 3;

/** Why nginx is not there, or null when it is (installed from Debian's packages when missing). */
function nginxMissing(): string | null {
  try {
    nginxBin();
    return null;
  } catch (err) {
    return (err as Error).message;
  }
}
const missing = hasDatabase() ? nginxMissing() : 'no database';
if (missing && hasDatabase()) console.warn(`tests/api/instances.test.ts skipped: nginx could not be installed (${missing})`);

let databaseUrl: string;
let db: Database;
let pool: pg.Pool;
let smtp: SmtpFake | undefined;
let balancer: LoadBalancer | undefined;
const instances: Instance[] = [];

/** A request through the load balancer; the answer with the instance that gave it. */
async function call(url: string, init: RequestInit & { cookie?: string; csrf?: string; json?: unknown } = {}) {
  const headers = new Headers(init.headers);
  if (init.cookie) headers.set('cookie', init.cookie);
  if (init.csrf) headers.set('x-csrf-token', init.csrf);
  if (init.json !== undefined) headers.set('content-type', 'application/json');
  const res = await fetch(`${balancer!.url}${url}`, { ...init, headers, body: init.json === undefined ? init.body : JSON.stringify(init.json) });
  const text = await res.text();
  return {
    status: res.status,
    instance: res.headers.get('x-instance'),
    cookies: res.headers.getSetCookie().map((c) => c.split(';')[0]!),
    body: (text ? JSON.parse(text) : null) as Record<string, unknown> & { token?: string; user?: { id: string; email: string; name: string } },
  };
}

async function signIn(email: string, password = DEMO_PASSWORD) {
  const res = await call('/api/auth/login', { method: 'POST', json: { email, password } });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return { cookie: res.cookies.join('; '), instance: res.instance };
}

describe.skipIf(missing !== null)('several instances behind one load balancer', () => {
  beforeAll(async () => {
    databaseUrl = await emptyDatabase('instances');
    const smtpPort = await freePort();
    const env = {
      NODE_ENV: 'test',
      LOG_LEVEL: 'warn',
      DATABASE_URL: databaseUrl,
      MAILBOX_DATABASE_URL: undefined,
      MIGRATE_ON_START: 'true',
      SESSION_SECRET: randomBytes(24).toString('hex'),
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(smtpPort),
      TRUST_PROXY: 'loopback',
      LOGIN_LIMIT_PER_ACCOUNT: String(PAIR_LIMIT),
    };
    // Every instance at the same moment, on a database with no schema yet.
    for (const n of NAMES) instances.push(startInstance({ name: n, port: await freePort(), env }));
    await Promise.all(instances.map((i) => i.ready()));
    smtp = await startSmtpFake({ databaseUrl, port: smtpPort });
    execFileSync(tsx, ['db/fixture-seed.ts'], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: databaseUrl, SEED_TODAY: TEST_TODAY },
      stdio: ['ignore', 'ignore', 'inherit'],
    });
    ({ db, pool } = createDb(databaseUrl, 4));
    balancer = await startLoadBalancer({ upstreams: instances.map((i) => i.port) });
  }, 600_000);

  afterAll(async () => {
    await balancer?.stop();
    await Promise.all(instances.map((i) => i.stop()));
    await smtp?.close();
    await db?.destroy();
  }, 60_000);

  it('starts every instance at once on an empty database and migrates the schema once', async () => {
    await expectEveryMigrationOnce(pool);
    for (const i of instances) {
      expect(i.child.exitCode, i.output.join('')).toBeNull();
      expect((await fetch(`${i.url}/api/health`)).status).toBe(200);
    }
  });

  it('keeps a person signed in whichever instance answers, round robin without stickiness', async () => {
    const member = await signIn('member@example.org');
    const seen = new Set<string | null>([member.instance]);
    for (let k = 0; k < 6; k++) {
      const me = await call('/api/auth/me', { cookie: member.cookie });
      expect(me.status).toBe(200);
      expect(me.body.user?.email).toBe('member@example.org');
      seen.add(me.instance);
    }
    expect([...seen].sort()).toEqual(NAMES);
    // Signed out through one instance, signed out on all.
    const csrf = await call('/api/auth/csrf', { cookie: member.cookie });
    expect((await call('/api/auth/logout', { method: 'POST', cookie: member.cookie, csrf: csrf.body.token })).status).toBe(204);
    for (let k = 0; k < NAMES.length; k++) expect((await call('/api/auth/me', { cookie: member.cookie })).status).toBe(401);
  });

  it('accepts a CSRF token issued by one instance on the others, signed in or not, and refuses a wrong one on all', async () => {
    const member = await signIn('brewer@example.org');
    const issued = await call('/api/auth/csrf', { cookie: member.cookie });
    const answeredBy = new Set<string | null>();
    for (let k = 0; k < NAMES.length; k++) {
      const res = await call('/api/auth/me', { method: 'PATCH', cookie: member.cookie, csrf: issued.body.token, json: { name: `Brewer on duty ${k}` } });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      answeredBy.add(res.instance);
    }
    expect([...answeredBy].sort()).toEqual(NAMES);
    for (let k = 0; k < NAMES.length; k++) {
      expect((await call('/api/auth/me', { method: 'PATCH', cookie: member.cookie, csrf: 'not-the-token', json: { name: 'Nobody' } })).status).toBe(403);
    }
    // Anonymous: the signed token of the cw.csrf cookie, from a browser, taken by whichever instance signs in.
    const anon = await call('/api/auth/csrf');
    const browser = { origin: balancer!.url, 'sec-fetch-site': 'same-origin' };
    const logins = [];
    for (let k = 0; k < NAMES.length; k++) {
      logins.push(
        await call('/api/auth/login', {
          method: 'POST',
          headers: browser,
          cookie: anon.cookies.join('; '),
          csrf: anon.body.token,
          json: { email: 'brewer@example.org', password: DEMO_PASSWORD },
        }),
      );
    }
    expect(logins.map((l) => l.status)).toEqual(NAMES.map(() => 200));
    expect(new Set(logins.map((l) => l.instance)).size).toBe(NAMES.length);
  });

  it('counts wrong passwords across instances: the address waits once the limit is used up, whichever instance it asks', async () => {
    const member = await createMember(db, {});
    const tries = [];
    for (let k = 0; k < PAIR_LIMIT; k++)
      tries.push(await call('/api/auth/login', { method: 'POST', json: { email: member.email, password: 'wrong password' } }));
    expect(tries.map((t) => t.status)).toEqual(Array(PAIR_LIMIT).fill(401));
    expect(new Set(tries.map((t) => t.instance)).size).toBe(NAMES.length);
    // Even the right password now waits, on every instance.
    for (let k = 0; k < NAMES.length; k++) {
      expect((await call('/api/auth/login', { method: 'POST', json: { email: member.email, password: DEMO_PASSWORD } })).status).toBe(429);
    }
  });

  it('ends a deactivated person’s session at once on every instance', async () => {
    const member = await createMember(db, {});
    const session = await signIn(member.email);
    const admin = await signIn('admin@example.org');
    const csrf = await call('/api/auth/csrf', { cookie: admin.cookie });
    expect((await call(`/api/users/${member.id}`, { method: 'PATCH', cookie: admin.cookie, csrf: csrf.body.token, json: { isActive: false } })).status).toBe(
      200,
    );
    const after = [];
    for (let k = 0; k < NAMES.length; k++) after.push(await call('/api/auth/me', { cookie: session.cookie }));
    expect(after.map((a) => a.status)).toEqual(NAMES.map(() => 401));
    expect(new Set(after.map((a) => a.instance)).size).toBe(NAMES.length);
  });

  it('sends each queued e-mail once, whichever instance queued it and whichever works the queue', async () => {
    const members = await Promise.all(Array.from({ length: 6 }, () => createMember(db, {})));
    const queuedBy = new Set<string | null>();
    for (const m of members) {
      const res = await call('/api/auth/password-reset', { method: 'POST', json: { email: m.email } });
      expect(res.status).toBe(202);
      queuedBy.add(res.instance);
    }
    expect(queuedBy.size).toBe(NAMES.length);
    // Once no e-mail job is waiting or running, every instance's workers have had their turn.
    const until = Date.now() + 30_000;
    let jobs: { state: string }[];
    for (;;) {
      jobs = (await pool.query<{ state: string }>(`select state from pgboss.job where name = 'email.send'`)).rows;
      if ((jobs.length >= members.length && jobs.every((j) => j.state === 'completed' || j.state === 'failed')) || Date.now() > until) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    expect(jobs.map((j) => j.state)).toEqual(members.map(() => 'completed'));
    const { rows } = await pool.query<{ to: string; n: number }>(
      'select t as to, count(*)::int as n from dev_mail_message, unnest(mail_to) t where t = any($1) group by t',
      [members.map((m) => m.email)],
    );
    expect(rows.map((r) => [r.to, r.n]).sort()).toEqual(members.map((m) => [m.email, 1]).sort());
  });
});
