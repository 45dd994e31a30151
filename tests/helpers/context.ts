import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import type { Express } from 'express';
import pg from 'pg';
import request from 'supertest';
import { afterAll, beforeAll, expect, inject } from 'vitest';
import { createApp } from '../../backend/app.ts';
import { loadConfig, type Config } from '../../backend/config/env.ts';
import { createDb, type Database } from '../../backend/db/database.ts';
import { migrationFolder } from '../../backend/db/migrate.ts';
import { ManualClock } from '../../backend/lib/clock.ts';
import type { Deps } from '../../backend/lib/deps.ts';
import { createQueue } from '../../backend/lib/queue.ts';
import { startSmtpFake, type SmtpFake } from '../../backend/fakes/smtp-fake.ts';
import { startWorkers } from '../../backend/workers.ts';
import { TEST_NOW } from './time.ts';
import { withDatabase } from './urls.ts';

export const DEMO_PASSWORD = 'cellar-demo';
export const hasDatabase = () => Boolean(inject('adminUrl'));

export interface MailMessage {
  id: string;
  mail_to: string[];
  subject: string;
  text_body: string;
  raw: string;
}

export interface TestContext {
  app: Express;
  db: Database;
  deps: Deps;
  config: Config;
  databaseUrl: string;
  smtp: SmtpFake;
  /** This context's clock: starts at TEST_NOW (or the `now` asked for) and runs on; tests move it. */
  clock: ManualClock;
  /** A signed-in client that sends its CSRF token on every non-GET request. */
  signIn(email: string, password?: string): Promise<ApiClient>;
  /** Waits until a message to `to` whose subject matches arrives at the SMTP fake. */
  waitForMail(to: string, subject?: RegExp, timeoutMs?: number): Promise<MailMessage>;
  close(): Promise<void>;
}

export class ApiClient {
  constructor(
    readonly agent: ReturnType<typeof request.agent>,
    public csrf: string,
    readonly user: { id: string; email: string; name: string; roles: string[] },
  ) {}
  get(url: string) {
    return this.agent.get(url);
  }
  post(url: string, body?: object) {
    const r = this.agent.post(url).set('X-CSRF-Token', this.csrf);
    return body === undefined ? r : r.send(body);
  }
  patch(url: string, body?: object) {
    return this.agent
      .patch(url)
      .set('X-CSRF-Token', this.csrf)
      .send(body ?? {});
  }
  put(url: string, body?: object) {
    return this.agent
      .put(url)
      .set('X-CSRF-Token', this.csrf)
      .send(body ?? {});
  }
  delete(url: string) {
    return this.agent.delete(url).set('X-CSRF-Token', this.csrf);
  }
}

/** A fresh database cloned from the seeded template, the app on it, its queue workers and an SMTP fake. */
/** A new database with no schema at all (for servers that migrate on start), named after `label`; its URL. */
export async function emptyDatabase(label: string): Promise<string> {
  const name = `${inject('dbPrefix')}${label}_${randomBytes(3).toString('hex')}`;
  const admin = new pg.Client({ connectionString: inject('adminUrl') });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  return withDatabase(inject('adminUrl'), name);
}

/** Every migration file is recorded as applied, each once. */
export async function expectEveryMigrationOnce(pool: pg.Pool) {
  const files = fs.readdirSync(migrationFolder).filter((f) => f.endsWith('.ts'));
  const { rows } = await pool.query<{ name: string }>('select name from kysely_migration');
  expect(rows.map((r) => `${r.name}.ts`).sort()).toEqual(files.sort());
}

export async function createTestContext(env: Record<string, string> = {}, { now = TEST_NOW }: { now?: string | Date } = {}): Promise<TestContext> {
  const adminUrl = inject('adminUrl');
  if (!adminUrl) throw new Error('DATABASE_URL is not set: run the suite with `npm test`, which starts a PostgreSQL');
  const name = `${inject('dbPrefix')}${randomBytes(5).toString('hex')}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`create database ${name} template ${inject('templateDb')}`);
  await admin.end();
  const databaseUrl = withDatabase(adminUrl, name);
  const smtp = await startSmtpFake({ databaseUrl });
  const config = loadConfig({ NODE_ENV: 'test', DATABASE_URL: databaseUrl, SMTP_PORT: String(smtp.port), PUBLIC_URL: 'http://127.0.0.1:3000', ...env });
  const { db, pool } = createDb(databaseUrl, 10);
  const queue = await createQueue(databaseUrl);
  const clock = new ManualClock(now);
  const deps: Deps = { config, db, pool, queue, clock };
  await startWorkers(deps);
  const app = createApp(deps);

  return {
    app,
    db,
    deps,
    config,
    databaseUrl,
    smtp,
    clock,
    async signIn(email, password = DEMO_PASSWORD) {
      const agent = request.agent(app);
      const res = await agent.post('/api/auth/login').send({ email, password });
      if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
      const csrf = await agent.get('/api/auth/csrf');
      return new ApiClient(agent, csrf.body.token, res.body.user);
    },
    async waitForMail(to, subject, timeoutMs = 15_000) {
      const until = Date.now() + timeoutMs;
      while (Date.now() < until) {
        const r = await pool.query<MailMessage>(
          'select id, mail_to, subject, text_body, raw from dev_mail_message where $1 = any(mail_to) order by received_at desc',
          [to.toLowerCase()],
        );
        const hit = r.rows.find((m) => !subject || subject.test(m.subject));
        if (hit) return hit;
        await new Promise((res) => setTimeout(res, 150));
      }
      throw new Error(`no e-mail to ${to}${subject ? ` matching ${subject}` : ''} within ${timeoutMs} ms`);
    },
    async close() {
      await queue.stop({ graceful: false, wait: true }).catch(() => undefined);
      await smtp.close();
      await db.destroy();
    },
  };
}

/** Signs in the named fixture accounts at once: `'brewer'` is brewer@example.org. */
export function signInAs<const T extends readonly string[]>(ctx: TestContext, ...who: T): Promise<{ [K in keyof T]: ApiClient }> {
  return Promise.all(who.map((name) => ctx.signIn(`${name}@example.org`))) as Promise<{ [K in keyof T]: ApiClient }>;
}

/** One test context for the file: created before its tests (then `setup` runs on it) and closed after them. */
export function useTestContext(setup: (ctx: TestContext) => Promise<void> | void, ...args: Parameters<typeof createTestContext>): void {
  let ctx: TestContext | undefined;
  beforeAll(async () => {
    ctx = await createTestContext(...args);
    await setup(ctx);
  });
  afterAll(async () => ctx?.close());
}

/** The link in an e-mail body (invitation, reset) and its token. */
export function linkFrom(text: string): { url: string; token: string } {
  const url = /https?:\/\/\S+token=([A-Za-z0-9_-]+)/.exec(text);
  if (!url) throw new Error(`no link in: ${text}`);
  return { url: url[0], token: url[1]! };
}
