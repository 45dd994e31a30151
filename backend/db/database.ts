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

/** How long a request waits for a connection before it is told the database is unavailable. */
export const CONNECT_TIMEOUT_MS = 5000;

/**
 * Attaches error listeners to a pool and to every client it opens. pg emits `error` on a client
 * whose connection dies while it is checked out (between two queries of a transaction, say) and
 * on idle ones; an `error` event nobody listens to ends the process. The query that was running, or
 * the next one, fails with the error anyway, so here it is only reported.
 */
export function guardPool(pool: pg.Pool, onError: (err: Error) => void = () => undefined): pg.Pool {
  pool.on('error', onError);
  pool.on('connect', (client) => {
    client.on('error', onError);
  });
  return pool;
}

export function createDb(connectionString: string, max = 10, { onError }: { onError?: (err: Error) => void } = {}): { db: Database; pool: pg.Pool } {
  const pool = guardPool(new pg.Pool({ connectionString, max, connectionTimeoutMillis: CONNECT_TIMEOUT_MS }), onError);
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  return { db, pool };
}

// Socket errors of a lost or refused connection.
const connectionCodes = new Set(['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', 'EHOSTUNREACH', 'ENETUNREACH', 'EAI_AGAIN']);
// SQLSTATEs of a server that is going away or not taking connections (class 08 is matched by prefix):
// admin_shutdown, crash_shutdown, cannot_connect_now, too_many_connections.
const unavailableStates = new Set(['57P01', '57P02', '57P03', '53300']);
// pg's and pg-pool's own messages when a connection ends or cannot be had in time.
const connectionMessages = [
  /^Connection terminated/i,
  /^timeout exceeded when trying to connect/i,
  /is not queryable/i,
  /^Client network socket disconnected/i,
];

/**
 * True when an error means PostgreSQL cannot be reached right now (down, restarting, refusing or
 * dropping connections) rather than that the query or the data was wrong. Such errors become 503.
 */
export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
  if (!err || typeof err !== 'object' || depth > 4) return false;
  const e = err as { code?: unknown; message?: unknown; cause?: unknown; errors?: unknown; status?: unknown; statusCode?: unknown };
  // An HTTP error (a client that hung up mid-body, say) is about the request, not the database.
  if (typeof e.status === 'number' || typeof e.statusCode === 'number') return false;
  if (typeof e.code === 'string') {
    if (connectionCodes.has(e.code) || unavailableStates.has(e.code)) return true;
    if (/^08[0-9A-Z]{3}$/.test(e.code)) return true;
  }
  if (typeof e.message === 'string' && connectionMessages.some((m) => m.test(e.message as string))) return true;
  if (Array.isArray(e.errors) && e.errors.length > 0 && e.errors.every((x) => isDatabaseUnavailable(x, depth + 1))) return true;
  return isDatabaseUnavailable(e.cause, depth + 1);
}
