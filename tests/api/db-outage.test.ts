// PostgreSQL stops under load and comes back. Runs its own cluster (the suite's shared one stays
// up for the other files) and the real server as a child process, so a crash would show as an exit.
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startSmtpFake, type SmtpFake } from '../../backend/fakes/smtp-fake.ts';
import { freePort, isRoot, root, startPostgres, tsx, withDatabase, type StartedPostgres } from '../../backend/scripts/lib.mjs';
import { TEST_TODAY } from '../helpers/time.ts';

const PASSWORD = 'cellar-demo';
const WRITERS = ['member@example.org', 'member2@example.org', 'member3@example.org'];
const LOAD_BEFORE_MS = 2500;
const DOWN_MS = 6000;
const LOAD_AFTER_MS = 5000;
/** No request may take longer than this, outage or not (the pool gives up connecting after 5 s). */
const REQUEST_BOUND_MS = 8000;
/** The contract: /api/health answers 200 within a second of the database's return. */
const HEALTH_RECOVERY_MS = 1000;

interface Outcome {
  kind: 'write' | 'read' | 'health';
  name?: string;
  t0: number;
  t1: number;
  status: number; // 0: no answer (the request failed or hung)
  type: string;
  body: Record<string, unknown> | null;
  retryAfter?: string;
  error?: string;
}

let tmp = '';
let dataDir = '';
let port = 0;
let cluster: StartedPostgres | null = null;
let databaseUrl = '';
let smtp: SmtpFake | null = null;
let server: ChildProcess | null = null;
let base = '';
const serverLog: string[] = [];

function stopCluster() {
  cluster?.stop();
}

async function waitFor<T>(what: string, probe: () => Promise<T | undefined>, timeoutMs: number, everyMs = 100): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe().catch(() => undefined);
    if (v !== undefined) return v;
    if (Date.now() > until) throw new Error(`${what}: not within ${timeoutMs} ms\n${serverLog.join('').slice(-4000)}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

async function call(kind: Outcome['kind'], url: string, init: RequestInit = {}, name?: string): Promise<Outcome> {
  const t0 = performance.now();
  try {
    const res = await fetch(`${base}${url}`, { ...init, signal: AbortSignal.timeout(REQUEST_BOUND_MS + 7000) });
    const text = await res.text();
    let body: Record<string, unknown> | null = null;
    try {
      body = text ? (JSON.parse(text) as Record<string, unknown>) : null;
    } catch {
      body = { text };
    }
    const retryAfter = res.headers.get('retry-after') ?? undefined;
    return { kind, name, t0, t1: performance.now(), status: res.status, type: res.headers.get('content-type') ?? '', body, retryAfter };
  } catch (err) {
    const cause = (err as Error & { cause?: { code?: string; message?: string } }).cause;
    return {
      kind,
      name,
      t0,
      t1: performance.now(),
      status: 0,
      type: '',
      body: null,
      error: `${(err as Error).message}${cause ? ` (${cause.code ?? ''} ${cause.message ?? ''})` : ''} at ${Math.round(t0)}..${Math.round(performance.now())}`,
    };
  }
}

/** A signed-in member: the session cookie and its CSRF token. */
async function signIn(email: string) {
  const res = await fetch(`${base}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email}: ${res.status} ${await res.text()}`);
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  const csrf = (await (await fetch(`${base}/api/auth/csrf`, { headers: { cookie } })).json()) as { token: string };
  return { email, cookie, csrf: csrf.token };
}

describe('a database outage under load', () => {
  beforeAll(async () => {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'cellarwright-outage-'));
    if (isRoot) execFileSync('chown', ['postgres:postgres', tmp]);
    dataDir = path.join(tmp, 'pg');
    port = await freePort();
    cluster = await startPostgres({ dataDir, port, throwaway: true });
    // Stopped even if the worker ends without running afterAll.
    process.once('exit', stopCluster);
    const admin = new pg.Client({ connectionString: cluster.url });
    await admin.connect();
    await admin.query('create database cellarwright');
    await admin.end();
    databaseUrl = withDatabase(cluster.url, 'cellarwright');
    // The same steps as the suite's template: migrations, the small fixture, the queue's schema.
    const env = { ...process.env, DATABASE_URL: databaseUrl, SEED_TODAY: TEST_TODAY };
    for (const script of ['db/migrate.ts', 'db/fixture-seed.ts', 'db/prepare-queue.ts']) {
      execFileSync(tsx, [script], { cwd: root, env, stdio: ['ignore', 'ignore', 'inherit'] });
    }
    smtp = await startSmtpFake({ databaseUrl });

    const appPort = await freePort();
    base = `http://127.0.0.1:${appPort}`;
    const serverEnv: Record<string, string | undefined> = {
      ...process.env,
      NODE_ENV: 'test',
      LOG_LEVEL: 'warn',
      HOST: '127.0.0.1',
      PORT: String(appPort),
      DATABASE_URL: databaseUrl,
      MAILBOX_DATABASE_URL: undefined,
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(smtp.port),
      PUBLIC_URL: base,
    };
    // One process (node with tsx's loader): if it dies, we see its exit.
    server = spawn(process.execPath, ['--import', 'tsx', 'backend/main.ts'], { cwd: root, env: serverEnv, stdio: ['ignore', 'pipe', 'pipe'] });
    server.stdout!.on('data', (d: Buffer) => serverLog.push(d.toString()));
    server.stderr!.on('data', (d: Buffer) => serverLog.push(d.toString()));
    await waitFor('the server answers /api/health', async () => ((await fetch(`${base}/api/health`)).status === 200 ? true : undefined), 60_000, 250);
  }, 180_000);

  afterAll(async () => {
    if (server && server.exitCode === null && server.signalCode === null) {
      const s = server;
      await new Promise<void>((resolve) => {
        const kill = setTimeout(() => s.kill('SIGKILL'), 10_000);
        s.once('exit', () => {
          clearTimeout(kill);
          resolve();
        });
        s.kill('SIGTERM');
      });
    }
    await smtp?.close().catch(() => undefined);
    stopCluster();
    process.removeListener('exit', stopCluster);
    if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
  }, 60_000);

  it('answers 503 while PostgreSQL is down, stays up, recovers on its own and loses or half-writes nothing', async () => {
    const outcomes: Outcome[] = [];
    const serverPid = server!.pid;
    let exited: string | null = null;
    server!.once('exit', (code, signal) => {
      exited = `exit code ${code}, signal ${signal}`;
    });

    const sessions = await Promise.all(WRITERS.map(signIn));
    let running = true;
    let seq = 0;
    // Each member writes (a batch: its row and its audit row in one transaction) and reads, in a loop.
    const writers = sessions.map(async (s, i) => {
      while (running) {
        const name = `Outage ${i}-${++seq}`;
        outcomes.push(
          await call(
            'write',
            '/api/batches',
            {
              method: 'POST',
              headers: { cookie: s.cookie, 'x-csrf-token': s.csrf, 'content-type': 'application/json' },
              body: JSON.stringify({ name, volumeLiters: 20 }),
            },
            name,
          ),
        );
        outcomes.push(await call('read', '/api/batches?pageSize=5', { headers: { cookie: s.cookie } }));
        await new Promise((r) => setTimeout(r, 25));
      }
    });
    // The load balancer's view: /api/health every 100 ms.
    const prober = (async () => {
      while (running) {
        outcomes.push(await call('health', '/api/health'));
        await new Promise((r) => setTimeout(r, 100));
      }
    })();

    await new Promise((r) => setTimeout(r, LOAD_BEFORE_MS));
    const tStopCalled = performance.now();
    await cluster!.stopAsync(); // pg_ctl stop -m fast: every connection is terminated
    const tDown = performance.now();
    // It really is down.
    const refused = await new pg.Client({ connectionString: databaseUrl, connectionTimeoutMillis: 2000 }).connect().then(
      () => false,
      () => true,
    );
    expect(refused).toBe(true);
    await new Promise((r) => setTimeout(r, DOWN_MS));
    const tStartCalled = performance.now();
    await cluster!.startAsync(); // pg_ctl start -w: resolves once it accepts connections
    const tUp = performance.now();
    await new Promise((r) => setTimeout(r, LOAD_AFTER_MS));
    running = false;
    await Promise.all([...writers, prober]);

    const report = () => `server log:\n${serverLog.join('').slice(-4000)}`;
    // 1. The server stayed up: the same process, never exited.
    expect(exited, report()).toBeNull();
    expect(server!.exitCode).toBeNull();
    expect(server!.pid).toBe(serverPid);

    // 2. Every answer is a success or a 503 problem; none hung past the bound.
    const ms = (o: Outcome) => Math.round(o.t1 - o.t0);
    const unexpected = outcomes.filter((o) => !(o.status >= 200 && o.status < 300) && o.status !== 503);
    const marks = `stop ${Math.round(tStopCalled)}, down ${Math.round(tDown)}, start ${Math.round(tStartCalled)}, up ${Math.round(tUp)}`;
    expect(
      unexpected.map((o) => `${o.kind} ${o.status} ${o.error ?? JSON.stringify(o.body)}`),
      `${marks}\n${report()}`,
    ).toEqual([]);
    const slowest = Math.max(...outcomes.map(ms));
    expect(slowest).toBeLessThan(REQUEST_BOUND_MS);
    for (const o of outcomes.filter((x) => x.status === 503)) {
      expect(o.type).toMatch(/^application\/problem\+json/);
      expect(o.body).toMatchObject({ status: 503, title: 'Service unavailable', detail: 'The database is unreachable; try again shortly.' });
      expect(Number(o.retryAfter)).toBeGreaterThan(0);
    }
    // Requests made while it was down (after the stop finished, before the start began) got 503, reads and writes alike.
    const duringOutage = outcomes.filter((o) => o.t0 > tDown && o.t1 < tStartCalled);
    expect(duringOutage.filter((o) => o.kind === 'write').length).toBeGreaterThan(3);
    expect(duringOutage.filter((o) => o.kind === 'read').length).toBeGreaterThan(3);
    expect(duringOutage.filter((o) => o.kind === 'health').length).toBeGreaterThan(3);
    expect(duringOutage.filter((o) => o.status !== 503)).toEqual([]);
    // Writes went through before and again after.
    expect(outcomes.some((o) => o.kind === 'write' && o.status === 201 && o.t1 < tStopCalled)).toBe(true);
    const writesAfter = outcomes.filter((o) => o.kind === 'write' && o.t0 > tUp + HEALTH_RECOVERY_MS);
    expect(writesAfter.length).toBeGreaterThan(0);
    expect(writesAfter.filter((o) => o.status !== 201)).toEqual([]);

    // 3. Health: 503 while down, 200 within a second of PostgreSQL accepting connections again.
    const firstHealthy = outcomes.filter((o) => o.kind === 'health' && o.t0 >= tUp && o.status === 200).sort((a, b) => a.t1 - b.t1)[0];
    expect(firstHealthy, report()).toBeDefined();
    const recoveryMs = Math.round(firstHealthy!.t1 - tUp);
    // Once the second has passed, every probe is healthy.
    expect(outcomes.filter((o) => o.kind === 'health' && o.t0 >= tUp + HEALTH_RECOVERY_MS && o.status !== 200)).toEqual([]);
    console.log(
      `outage: ${outcomes.length} requests, ${outcomes.filter((o) => o.status === 503).length} answered 503, slowest ${slowest} ms; ` +
        `down ${Math.round(tStartCalled - tStopCalled)} ms; health 200 again ${recoveryMs} ms after PostgreSQL was back`,
    );
    // The first healthy answer: measured from outside on a shared machine, so with room to spare.
    expect(recoveryMs).toBeLessThanOrEqual(2 * HEALTH_RECOVERY_MS);

    // 4. Every write answered 201 is in the database; every batch is whole (its audit row too), and none answered with an error is half-written.
    const check = new pg.Client({ connectionString: databaseUrl });
    await check.connect();
    try {
      const { rows } = await check.query<{ name: string; audits: number }>(
        `select b.name, (select count(*)::int from audit_log a where a.subject_type = 'Batch' and a.subject_id = b.id::text and a.action = 'created') as audits
           from batch b where b.name like 'Outage %'`,
      );
      const stored = new Map(rows.map((r) => [r.name, r.audits]));
      const { rows: orphans } = await check.query(
        `select a.id from audit_log a where a.subject_type = 'Batch' and a.action = 'created' and not exists (select 1 from batch b where b.id::text = a.subject_id)`,
      );
      expect(orphans).toEqual([]);
      const writes = outcomes.filter((o) => o.kind === 'write');
      const answered = writes.filter((o) => o.status === 201);
      expect(answered.filter((o) => !stored.has(o.name!)).map((o) => o.name)).toEqual([]);
      expect([...stored.values()].every((n) => n === 1)).toBe(true);
      // A write answered with an error may have committed (the answer can be lost after the commit), but never in part.
      const failed = writes.filter((o) => o.status !== 201);
      expect(failed.length).toBeGreaterThan(0);
      expect(failed.filter((o) => stored.has(o.name!) && stored.get(o.name!) !== 1)).toEqual([]);
      expect(stored.size).toBeGreaterThanOrEqual(answered.length);
    } finally {
      await check.end();
    }

    // 5. Queued work resumes on its own: a password-reset e-mail asked for after the outage is delivered.
    const reset = await call('write', '/api/auth/password-reset', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'member4@example.org' }),
    });
    expect(reset.status).toBe(202);
    const mail = new pg.Client({ connectionString: databaseUrl });
    await mail.connect();
    try {
      const delivered = await waitFor(
        'the password-reset e-mail',
        async () => {
          const r = await mail.query(`select subject from dev_mail_message where 'member4@example.org' = any(mail_to)`);
          return r.rowCount ? r.rows[0] : undefined;
        },
        30_000,
        200,
      );
      expect(delivered.subject).toMatch(/Reset your Cellarwright password/);
    } finally {
      await mail.end();
    }
    expect(exited).toBeNull();
  }, 120_000);
});
