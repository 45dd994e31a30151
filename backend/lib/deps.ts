import type PgBoss from 'pg-boss';
import type { Config } from '../config/env.ts';
import type { Database } from '../db/database.ts';
import type pg from 'pg';

/** What every module needs; built once in main.ts (or by the test context) and passed down. */
export interface Deps {
  config: Config;
  db: Database;
  pool: pg.Pool;
  queue: PgBoss;
}
