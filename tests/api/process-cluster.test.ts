import { type ChildProcess, spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDb, type Database } from '../../backend/db/database.ts';
import { freePort, root } from '../../backend/scripts/lib.mjs';
import { createMember } from '../../db/factories/index.ts';
import { DEMO_PASSWORD, emptyDatabase, expectEveryMigrationOnce, hasDatabase } from '../helpers/context.ts';

// One machine, several server processes sharing the port (WEB_CONCURRENCY): the primary migrates an empty
// database once, starts the processes, starts again one that dies while the others keep answering, and
// stops them all on SIGTERM. A person signed in stays signed in whichever process answers.

const PROCESSES = 2;
let databaseUrl: string;
let db: Database;
let pool: pg.Pool;
let primary: ChildProcess;
let base: string;
const output: string[] = [];

/** The Node.js processes whose parent is `pid` (Linux: read from /proc; tsx's compiler service is not one). */
function childrenOf(pid: number): number[] {
  return fs
    .readdirSync('/proc')
    .filter((d) => /^\d+$/.test(d))
    .filter((d) => {
      try {
        // stat: "pid (name) state ppid …"; the name may hold spaces, so read after its closing parenthesis.
        const stat = fs.readFileSync(`/proc/${d}/stat`, 'utf8');
        const name = stat.slice(stat.indexOf('(') + 1, stat.lastIndexOf(')'));
        return name === 'node' && Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) === pid;
      } catch {
        return false;
      }
    })
    .map(Number)
    .sort((a, b) => a - b);
}

async function until<T>(what: string, probe: () => T | undefined | Promise<T | undefined>, timeoutMs = 60_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await Promise.resolve(probe()).catch(() => undefined);
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`${what}: not within ${timeoutMs} ms\n${output.join('').slice(-4000)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** `GET /api/auth/me` on a connection of its own (a kept-alive one may belong to a process that was stopped). */
function me(cookie: string): Promise<{ status: number; body: string }> {
  return new Promise((resolve, reject) => {
    http
      .get(`${base}/api/auth/me`, { headers: { cookie }, agent: false }, (res) => {
        let body = '';
        res.on('data', (d: Buffer) => (body += d.toString()));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
      })
      .on('error', reject);
  });
}

describe.skipIf(!hasDatabase())('several server processes on one machine', () => {
  beforeAll(async () => {
    databaseUrl = await emptyDatabase('cluster');
    const port = await freePort();
    base = `http://127.0.0.1:${port}`;
    primary = spawn(process.execPath, ['--import', 'tsx', 'backend/main.ts'], {
      cwd: root,
      env: {
        ...process.env,
        NODE_ENV: 'test',
        LOG_LEVEL: 'warn',
        HOST: '127.0.0.1',
        PORT: String(port),
        DATABASE_URL: databaseUrl,
        MAILBOX_DATABASE_URL: undefined,
        MIGRATE_ON_START: 'true',
        WEB_CONCURRENCY: String(PROCESSES),
        WORKERS: 'false',
        SESSION_SECRET: randomBytes(24).toString('hex'),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    primary.stdout!.on('data', (d: Buffer) => output.push(d.toString()));
    primary.stderr!.on('data', (d: Buffer) => output.push(d.toString()));
    await until('every process listens', () => (output.join('').includes(`(${PROCESSES} processes)`) ? true : undefined), 180_000);
    ({ db, pool } = createDb(databaseUrl, 2));
  }, 240_000);

  afterAll(async () => {
    if (primary && primary.exitCode === null && primary.signalCode === null) primary.kill('SIGKILL');
    await db?.destroy();
  }, 30_000);

  it('migrates once in the primary and starts the configured number of processes', async () => {
    await expectEveryMigrationOnce(pool);
    expect(childrenOf(primary.pid!)).toHaveLength(PROCESSES);
    expect((await fetch(`${base}/api/health`)).status).toBe(200);
  });

  it('keeps a person signed in across the processes, and replaces a process that dies while the others answer', async () => {
    const member = await createMember(db, { email: 'cluster-member@example.org' });
    const login = await fetch(`${base}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: member.email, password: DEMO_PASSWORD }),
    });
    expect(login.status).toBe(200);
    const cookie = login.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    // Many requests at once, on connections of their own, so that more than one process takes them.
    const answers = await Promise.all(Array.from({ length: 12 }, () => me(cookie)));
    expect(answers.map((r) => r.status)).toEqual(Array(12).fill(200));
    expect((JSON.parse(answers[0]!.body) as { user: { email: string } }).user.email).toBe(member.email);

    const [victim, survivor] = childrenOf(primary.pid!);
    process.kill(victim!, 'SIGKILL');
    // The survivor serves while the primary starts a replacement.
    expect((await me(cookie)).status).toBe(200);
    const replaced = await until('a replacement process', () => {
      const now = childrenOf(primary.pid!);
      return now.length === PROCESSES && !now.includes(victim!) ? now : undefined;
    });
    expect(replaced).toContain(survivor);
    const after = await Promise.all(Array.from({ length: 12 }, () => me(cookie)));
    expect(after.map((r) => r.status)).toEqual(Array(12).fill(200));
  }, 120_000);

  it('stops every process on SIGTERM, and then itself with code 0', async () => {
    const workers = childrenOf(primary.pid!);
    const exited = new Promise<number | null>((resolve) => primary.once('exit', (code) => resolve(code)));
    primary.kill('SIGTERM');
    expect(await exited).toBe(0);
    for (const pid of workers) expect(fs.existsSync(`/proc/${pid}`)).toBe(false);
  });
});
