import { type Kysely, sql } from 'kysely';

/**
 * Trace and recall: a batch records its allergen notes (a free list) and may override the co-op's
 * shelf life; each keg fill stores its best-before, worked out when the keg is filled.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable('batch')
    .addColumn('allergens', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'::text[]`))
    .addColumn('shelf_life_days', 'integer', (c) => c.check(sql`shelf_life_days is null or shelf_life_days between 1 and 3650`))
    .execute();
  await sql`alter table batch add constraint batch_allergens_check check (
    cardinality(allergens) <= 20 and array_position(allergens, null) is null)`.execute(db);

  await db.schema.alterTable('keg_fill').addColumn('best_before', 'timestamptz').execute();
  await sql`alter table keg_fill add constraint keg_fill_best_before_check check (best_before is null or best_before > filled_at)`.execute(db);
  // Today's "near best-before" looks only at kegs still holding their fill.
  await sql`create index keg_fill_open_best_before_idx on keg_fill (best_before) where emptied_at is null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists keg_fill_open_best_before_idx`.execute(db);
  await sql`alter table keg_fill drop constraint if exists keg_fill_best_before_check`.execute(db);
  await db.schema.alterTable('keg_fill').dropColumn('best_before').execute();
  await sql`alter table batch drop constraint if exists batch_allergens_check`.execute(db);
  await db.schema.alterTable('batch').dropColumn('allergens').dropColumn('shelf_life_days').execute();
}
