import { promises as fs } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { FileMigrationProvider, type Kysely, Migrator } from 'kysely';

export const migrationFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../db/migrations');

/** Runs every pending migration; Kysely takes a lock, so several instances may call this at once. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- migrations run against the database as it was, not today's types
export async function migrateToLatest(db: Kysely<any>, { quiet = false } = {}): Promise<void> {
  const migrator = new Migrator({ db, provider: new FileMigrationProvider({ fs, path, migrationFolder }) });
  const { error, results } = await migrator.migrateToLatest();
  for (const r of results ?? []) {
    if (!quiet || r.status !== 'Success') console.log(`migration ${r.migrationName}: ${r.status}`);
  }
  if (error) throw error instanceof Error ? error : new Error(JSON.stringify(error));
}
