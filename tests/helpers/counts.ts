import { sql } from 'kysely';
import type { DB } from '../../backend/db/schema.ts';
import type { TestContext } from './context.ts';

/** How many readings a batch has in the database. */
export async function countReadings(ctx: TestContext, batchId: string): Promise<number> {
  const r = await ctx.db
    .selectFrom('reading')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('batch_id', '=', batchId)
    .executeTakeFirstOrThrow();
  return Number(r.n);
}

/** How many rows a table holds. */
export async function countRows(ctx: TestContext, table: keyof DB): Promise<number> {
  const r = await sql<{ n: number }>`select count(*)::int as n from ${sql.table(table)}`.execute(ctx.db);
  return r.rows[0]!.n;
}

/** How many rows each table holds, by name (`{ batch: 3, reading: 12 }`): to show that a refused request wrote nothing. */
export async function rowCounts<T extends keyof DB>(ctx: TestContext, tables: readonly T[]): Promise<Record<T, number>> {
  const counts = await Promise.all(tables.map(async (t) => [t, await countRows(ctx, t)] as const));
  return Object.fromEntries(counts) as Record<T, number>;
}
