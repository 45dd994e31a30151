import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import { sql } from 'kysely';
import type { Database } from '../db/database.ts';

/**
 * express-rate-limit counters kept in PostgreSQL, so every app instance counts the same hits. A window
 * is real elapsed time, so it is measured by the database's own clock alone (one clock for every instance).
 */
export class PgRateLimitStore implements Store {
  localKeys = false;
  constructor(
    private readonly db: Database,
    public prefix: string,
    /** The window; express-rate-limit sets it from its own options through `init`. */
    private windowMs = 60_000,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const k = this.prefix + key;
    const row = await this.db
      .insertInto('rate_limit')
      .values({ key: k, hits: 1, reset_at: sql<Date>`now() + ${this.windowMs} * interval '1 millisecond'` })
      .onConflict((oc) =>
        oc.column('key').doUpdateSet({
          hits: sql`case when rate_limit.reset_at <= now() then 1 else rate_limit.hits + 1 end`,
          reset_at: sql`case when rate_limit.reset_at <= now() then excluded.reset_at else rate_limit.reset_at end`,
        }),
      )
      .returning(['hits', 'reset_at'])
      .executeTakeFirstOrThrow();
    return { totalHits: row.hits, resetTime: new Date(row.reset_at) };
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const row = await this.db
      .selectFrom('rate_limit')
      .select(['hits', 'reset_at'])
      .where('key', '=', this.prefix + key)
      .where('reset_at', '>', sql<Date>`now()`)
      .executeTakeFirst();
    return row ? { totalHits: row.hits, resetTime: new Date(row.reset_at) } : undefined;
  }

  async decrement(key: string): Promise<void> {
    await this.db
      .updateTable('rate_limit')
      .set({ hits: sql`greatest(hits - 1, 0)` })
      .where('key', '=', this.prefix + key)
      .execute();
  }

  async resetKey(key: string): Promise<void> {
    await this.db
      .deleteFrom('rate_limit')
      .where('key', '=', this.prefix + key)
      .execute();
  }

  /** Deletes counters whose window ended (any prefix): each address and pair leaves a row behind otherwise. */
  async pruneExpired(): Promise<void> {
    await this.db
      .deleteFrom('rate_limit')
      .where('reset_at', '<=', sql<Date>`now()`)
      .execute();
  }
}
