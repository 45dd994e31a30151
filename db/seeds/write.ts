import type { Insertable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { DB } from '../../backend/db/schema.ts';

/**
 * Inserts the demo's rows into `table` a chunk of `size` at a time (one statement may carry at most
 * 65,535 parameters); `skipExisting` leaves rows whose key is there already as they are.
 */
export async function insertInChunks<T extends keyof DB>(
  db: Database,
  table: T,
  rows: readonly Insertable<DB[T]>[],
  { size = 300, skipExisting = false }: { size?: number; skipExisting?: boolean } = {},
): Promise<void> {
  for (let i = 0; i < rows.length; i += size) {
    const insert = db.insertInto(table).values(rows.slice(i, i + size));
    await (skipExisting ? insert.onConflict((oc) => oc.doNothing()) : insert).execute();
  }
}
