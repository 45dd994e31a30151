import { type Kysely, sql } from 'kysely';

/**
 * Batches (one per brew), their gravity readings, each member's last import mapping, import
 * progress rows that any app instance can answer polls from, the fermentation settings, and the
 * packaging source the production records read.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('batch')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('owner_id', 'uuid', (c) => c.notNull().references('app_user.id'))
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(trim(name)) between 1 and 120`))
    .addColumn('style', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('volume_liters', sql`numeric(8,2)`, (c) => c.notNull().check(sql`volume_liters > 0`))
    .addColumn('target_og', sql`numeric(5,4)`, (c) => c.check(sql`target_og is null or target_og between 0.980 and 1.200`))
    .addColumn('target_fg', sql`numeric(5,4)`, (c) => c.check(sql`target_fg is null or target_fg between 0.980 and 1.200`))
    .addColumn('status', 'text', (c) =>
      c
        .notNull()
        .defaultTo('planned')
        .check(sql`status in ('planned','fermenting','conditioning','packaged','discarded')`),
    )
    .addColumn('packaged_at', 'timestamptz')
    .addColumn('packaged_liters', sql`numeric(8,2)`, (c) => c.check(sql`packaged_liters is null or packaged_liters >= 0`))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('batch_targets_check', sql`target_og is null or target_fg is null or target_fg < target_og`)
    .execute();
  await db.schema.createIndex('batch_owner_id_idx').on('batch').columns(['owner_id', 'created_at']).execute();
  await db.schema.createIndex('batch_status_idx').on('batch').column('status').execute();

  // A fermenter booking may name the batch it holds.
  await sql`alter table booking add constraint booking_batch_id_fkey foreign key (batch_id) references batch (id) on delete set null`.execute(db);
  await db.schema.createIndex('booking_batch_id_idx').on('booking').column('batch_id').execute();

  await db.schema
    .createTable('reading')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('batch_id', 'uuid', (c) => c.notNull().references('batch.id').onDelete('cascade'))
    .addColumn('taken_at', 'timestamptz', (c) => c.notNull())
    // The gravity every figure uses: specific gravity 20/20, temperature-corrected where asked.
    .addColumn('gravity_sg', sql`numeric(6,4)`, (c) => c.notNull().check(sql`gravity_sg between 0.980 and 1.200`))
    // What was typed or imported, in the unit it came in.
    .addColumn('entered_value', sql`numeric(8,4)`, (c) => c.notNull())
    .addColumn('entered_unit', 'text', (c) => c.notNull().check(sql`entered_unit in ('sg','plato','brix')`))
    .addColumn('temperature_c', sql`numeric(5,2)`, (c) => c.check(sql`temperature_c is null or temperature_c between -10 and 100`))
    // Hydrometer temperature correction or refractometer alcohol correction applied; raw_sg is the gravity before it.
    .addColumn('corrected', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('raw_sg', sql`numeric(6,4)`)
    .addColumn('source', 'text', (c) =>
      c
        .notNull()
        .defaultTo('manual')
        .check(sql`source in ('manual','import')`),
    )
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  // One reading per batch and moment: a second one at the same time is a duplicate.
  await db.schema.createIndex('reading_batch_taken_at_key').unique().on('reading').columns(['batch_id', 'taken_at']).execute();

  // The last column mapping each person used for an import, proposed again next time.
  await db.schema
    .createTable('reading_import_mapping')
    .addColumn('user_id', 'uuid', (c) => c.primaryKey().references('app_user.id').onDelete('cascade'))
    .addColumn('mapping', 'jsonb', (c) => c.notNull())
    .addColumn('headers', sql`text[]`, (c) => c.notNull())
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  // Progress of a running import, written outside its transaction so that any instance can answer a poll.
  await db.schema
    .createTable('reading_import_progress')
    .addColumn('id', 'uuid', (c) => c.primaryKey())
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
    .addColumn('batch_id', 'uuid', (c) => c.notNull().references('batch.id').onDelete('cascade'))
    .addColumn('phase', 'text', (c) => c.notNull().check(sql`phase in ('reading','checking','writing','done','failed')`))
    .addColumn('rows_done', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('rows_total', 'integer')
    .addColumn('message', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('started_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('reading_import_progress_updated_at_idx').on('reading_import_progress').column('updated_at').execute();

  // Stable-gravity test and correction defaults (common practice: within 0.001 over 3 days).
  await sql`insert into setting (key, value) values ('fermentation', ${JSON.stringify({
    stableToleranceSg: 0.001,
    stableSpanDays: 3,
    hydrometerCalibrationC: 20,
    wortCorrectionFactor: 1.04,
  })}::jsonb) on conflict (key) do nothing`.execute(db);

  // Where the production records find packaged volumes: one row per packaging event. Until cellar
  // transfers exist this reads the volume recorded on the batch when it is marked packaged; the
  // transfers capability replaces this view (create or replace) to read its transfer rows instead.
  await sql`create view production_packaging as
    select b.id as batch_id, b.packaged_at as packaged_at, b.packaged_liters as liters
    from batch b
    where b.packaged_at is not null and b.packaged_liters is not null and b.status <> 'discarded'`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop view if exists production_packaging`.execute(db);
  await sql`delete from setting where key = 'fermentation'`.execute(db);
  await db.schema.dropTable('reading_import_progress').ifExists().execute();
  await db.schema.dropTable('reading_import_mapping').ifExists().execute();
  await db.schema.dropTable('reading').ifExists().execute();
  await sql`alter table booking drop constraint if exists booking_batch_id_fkey`.execute(db);
  await db.schema.dropIndex('booking_batch_id_idx').ifExists().execute();
  await db.schema.dropTable('batch').ifExists().execute();
}
