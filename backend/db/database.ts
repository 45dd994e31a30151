import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import type { DB } from './schema.ts';

// bigint (counts, sums) and numeric come back from pg as strings; our counts and measured
// quantities fit a double, so parse them once here. Money stays integer cents in int/bigint columns.
pg.types.setTypeParser(20, (v) => Number.parseInt(v, 10));
pg.types.setTypeParser(1700, (v) => Number.parseFloat(v));
// A `date` (no time, no zone) stays 'YYYY-MM-DD' text: turning it into a Date would pin it to a time zone.
pg.types.setTypeParser(1082, (v) => v);

export type Database = Kysely<DB>;

export function createDb(connectionString: string, max = 10): { db: Database; pool: pg.Pool } {
  const pool = new pg.Pool({ connectionString, max });
  pool.on('error', () => {
    /* idle client errors surface on the next query */
  });
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  return { db, pool };
}
