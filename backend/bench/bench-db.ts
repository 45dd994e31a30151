// A fresh, migrated and seeded database for one benchmark, on the server DATABASE_URL points at.
import { execFileSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import pg from 'pg';
import { createDb } from '../db/database.ts';

export async function benchDatabase(label: string, { seed = true } = {}) {
  const adminUrl = process.env.DATABASE_URL;
  if (!adminUrl) throw new Error('DATABASE_URL is required (npm run bench starts one)');
  const name = `cw_bench_${label}_${randomBytes(3).toString('hex')}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`create database ${name}`);
  const u = new URL(adminUrl);
  u.pathname = `/${name}`;
  const url = u.toString();
  const tsx = path.resolve('node_modules/.bin/tsx');
  const env = { ...process.env, DATABASE_URL: url };
  execFileSync(tsx, ['db/migrate.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  if (seed) execFileSync(tsx, ['db/seed.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  const { db, pool } = createDb(url, 8);
  return {
    url,
    db,
    pool,
    async drop() {
      await db.destroy();
      await admin.query(`drop database if exists ${name} with (force)`);
      await admin.end();
    },
  };
}

/** Peak resident memory so far, in MiB. */
export const peakRssMiB = () => Math.round(process.resourceUsage().maxRSS / 1024);

export function time<T>(fn: () => Promise<T>): Promise<{ ms: number; value: T }> {
  const t0 = performance.now();
  return fn().then((value) => ({ ms: performance.now() - t0, value }));
}
