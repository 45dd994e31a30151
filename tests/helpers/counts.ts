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
