import { type Kysely, sql } from 'kysely';

/**
 * Pressure-vessel and gas records: inspections of kegs and cylinders (pressure test, relief valve,
 * seals, hydrostatic test) with their next due time, and each CO2 cylinder's contents, whether it is
 * the one connected to the gas line, and its log (connected, refilled, drawn for a fill or purge).
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('equipment_inspection')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('equipment_id', 'uuid', (c) => c.notNull().references('equipment.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('pressure_test','relief_valve','seals','hydrostatic_test')`))
    .addColumn('at', 'timestamptz', (c) => c.notNull())
    .addColumn('passed', 'boolean', (c) => c.notNull())
    .addColumn('next_due_at', 'timestamptz')
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('recorded_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // A passing inspection says when the next one is due, and that is after it.
    .addCheckConstraint('equipment_inspection_next_due_check', sql`(not passed or next_due_at is not null) and (next_due_at is null or next_due_at > at)`)
    .execute();
  await db.schema.createIndex('equipment_inspection_equipment_idx').on('equipment_inspection').columns(['equipment_id', 'kind', 'at']).execute();

  await db.schema
    .createTable('co2_cylinder_supply')
    .addColumn('cylinder_id', 'uuid', (c) => c.primaryKey().references('equipment.id').onDelete('cascade'))
    // Never below zero: CO2 drawn beyond what is left is refused.
    .addColumn('remaining_kg', sql`numeric(8,3)`, (c) => c.notNull().check(sql`remaining_kg >= 0`))
    .addColumn('connected', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('connected_at', 'timestamptz')
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  // One cylinder supplies the co-op's gas line at a time.
  await sql`create unique index co2_cylinder_one_connected on co2_cylinder_supply ((true)) where connected`.execute(db);

  await db.schema
    .createTable('co2_cylinder_event')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('cylinder_id', 'uuid', (c) => c.notNull().references('equipment.id').onDelete('cascade'))
    .addColumn('action', 'text', (c) => c.notNull().check(sql`action in ('connected','disconnected','refilled','drawn')`))
    .addColumn('kg', sql`numeric(8,3)`, (c) =>
      c
        .notNull()
        .defaultTo(0)
        .check(sql`kg >= 0`),
    )
    .addColumn('remaining_kg', sql`numeric(8,3)`, (c) => c.notNull().check(sql`remaining_kg >= 0`))
    .addColumn('replaced_cylinder_id', 'uuid', (c) => c.references('equipment.id').onDelete('set null'))
    .addColumn('source_type', 'text', (c) => c.check(sql`source_type in ('keg_fill','sanitation_cycle')`))
    .addColumn('source_id', 'text')
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('actor_id', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('at', 'timestamptz', (c) => c.notNull())
    .execute();
  await db.schema.createIndex('co2_cylinder_event_cylinder_idx').on('co2_cylinder_event').columns(['cylinder_id', 'at']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('co2_cylinder_event').execute();
  await db.schema.dropTable('co2_cylinder_supply').execute();
  await db.schema.dropTable('equipment_inspection').execute();
}
