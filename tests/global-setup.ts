// Runs once before all test files: migrates and seeds a template database on the throwaway
// PostgreSQL that `npm test` started. TEST_TEMPLATE picks what the template holds: `fixtures` (the
// default: the small test fixture, db/fixtures, that each test adds to with the factories in
// db/factories) or `demo` (the demo co-op, db/seeds). Each test file then clones it (CREATE DATABASE … TEMPLATE),
// so files run in parallel without seeing each other's writes.
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import pg from 'pg';
import type { TestProject } from 'vitest/node';
import { TEST_TODAY } from './helpers/time.ts';
import { withDatabase } from './helpers/urls.ts';

const tsx = path.resolve('node_modules/.bin/tsx');

declare module 'vitest' {
  export interface ProvidedContext {
    adminUrl: string;
    templateDb: string;
    dbPrefix: string;
  }
}

export default async function setup(project: TestProject) {
  const adminUrl = process.env.DATABASE_URL;
  if (!adminUrl) {
    project.provide('adminUrl', '');
    project.provide('templateDb', '');
    project.provide('dbPrefix', '');
    return;
  }
  const prefix = `cw_t${process.pid}_`;
  const template = `${prefix}template`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`drop database if exists ${template}`);
  await admin.query(`create database ${template}`);
  // The same commands `npm start` runs (global setup runs outside Vite, so .ts loads through tsx).
  // Seeded as of a fixed day, so what the tests find never depends on the day they run.
  const env = { ...process.env, DATABASE_URL: withDatabase(adminUrl, template), SEED_TODAY: TEST_TODAY };
  const kind = process.env.TEST_TEMPLATE ?? 'fixtures';
  if (kind !== 'demo' && kind !== 'fixtures') throw new Error(`TEST_TEMPLATE must be demo or fixtures, not ${kind}`);
  const seed = kind === 'fixtures' ? 'db/fixture-seed.ts' : 'db/seed.ts';
  for (const script of ['db/migrate.ts', seed, 'db/prepare-queue.ts']) {
    execFileSync(tsx, [script], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  }
  project.provide('adminUrl', adminUrl);
  project.provide('templateDb', template);
  project.provide('dbPrefix', prefix);

  return async () => {
    const { rows } = await admin.query<{ datname: string }>('select datname from pg_database where datname like $1', [`${prefix}%`]);
    for (const r of rows) await admin.query(`drop database if exists ${r.datname} with (force)`);
    await admin.end();
  };
}
