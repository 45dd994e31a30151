import type PgBoss from 'pg-boss';
import type { Config } from '../config/env.ts';
import type { Database } from '../db/database.ts';
import type pg from 'pg';
import type { Clock } from './clock.ts';

/** What every module needs; built once in main.ts (or by the test context) and passed down. */
export interface Deps {
  config: Config;
  db: Database;
  pool: pg.Pool;
  queue: PgBoss;
  /** The one clock every business rule reads "now" from (tests set it). */
  clock: Clock;
}
