import PgBoss from 'pg-boss';
import pg from 'pg';
import { CONNECT_TIMEOUT_MS, isDatabaseUnavailable } from '../db/database.ts';

export const queues = ['email.send', 'bookings.advance', 'cellar.carbonation-reminder', 'cellar.periodic', 'carbonation.periodic'] as const;

/**
 * Reports the queue's errors without flooding the log: while the database is down every worker's
 * poll fails, so connection errors are written once and then summed up every `quietMs`.
 */
export function queueErrorReporter(write: (msg: string) => void = (msg) => console.error(msg), quietMs = 30_000, now: () => number = Date.now) {
  let lastOutage = Number.NEGATIVE_INFINITY;
  let suppressed = 0;
  return (err: Error) => {
    if (!isDatabaseUnavailable(err)) return write(`queue error: ${err.stack ?? err.message}`);
    const t = now();
    if (t - lastOutage < quietMs) {
      suppressed += 1;
      return;
    }
    write(`queue error (database unavailable; the queue retries on its own): ${err.message}${suppressed ? ` (+${suppressed} more like it)` : ''}`);
    lastOutage = t;
    suppressed = 0;
  };
}

/**
 * pg-boss on the application's own PostgreSQL: jobs survive restarts and are shared by all instances.
 * Its workers keep polling through a database outage (each failed poll is an `error` event, which
 * must have a listener) and pick up where they were once it is back.
 */
export async function createQueue(connectionString: string, extraQueues: string[] = []): Promise<PgBoss> {
  // pg-boss hands its options on to its pg pool; its types only list the common ones.
  const options = { connectionString, max: 4, schema: 'pgboss', connectionTimeoutMillis: CONNECT_TIMEOUT_MS } as PgBoss.ConstructorOptions;
  const boss = new PgBoss(options);
  boss.on('error', queueErrorReporter());
  await boss.start();
  await oneInstanceAtATime(connectionString, async () => {
    for (const name of [...queues, ...extraQueues]) await boss.createQueue(name);
  });
  return boss;
}

/**
 * Runs `fn` while holding a lock that every instance on this database takes: instances started at the same
 * moment on a fresh database would otherwise create the same queues side by side, and PostgreSQL finds
 * them deadlocked on pg-boss's queue table (one instance then fails to start).
 */
async function oneInstanceAtATime(connectionString: string, fn: () => Promise<void>): Promise<void> {
  const client = new pg.Client({ connectionString, connectionTimeoutMillis: CONNECT_TIMEOUT_MS });
  await client.connect();
  try {
    await client.query(`select pg_advisory_lock(hashtext('cellarwright: queue setup'))`);
    await fn();
  } finally {
    // Ending the connection releases the lock.
    await client.end();
  }
}
