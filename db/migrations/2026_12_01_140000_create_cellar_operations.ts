import { type Kysely, sql } from 'kysely';

/**
 * Cellar operations: sanitation cycles and their steps, transfers from fermenter to kegs and the
 * fills they make, where each keg is (and its movements), and carbonation plans. The production
 * records' packaging source now reads transfers.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('sanitation_cycle')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('equipment_id', 'uuid', (c) => c.notNull().references('equipment.id'))
    .addColumn('started_at', 'timestamptz', (c) => c.notNull())
    .addColumn('completed_at', 'timestamptz', (c) => c.notNull())
    .addColumn('outcome', 'text', (c) => c.notNull().check(sql`outcome in ('ready','cleaned','needs_cleaning')`))
    .addColumn('complete', 'boolean', (c) => c.notNull())
    .addColumn('issues', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('freshness_days', 'integer')
    .addColumn('fresh_until', 'timestamptz')
    .addColumn('recorded_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('sanitation_cycle_times_check', sql`completed_at >= started_at`)
    .addCheckConstraint('sanitation_cycle_complete_check', sql`complete = (outcome = 'ready') and complete = (fresh_until is not null)`)
    .execute();
  await db.schema.createIndex('sanitation_cycle_equipment_completed_idx').on('sanitation_cycle').columns(['equipment_id', 'completed_at']).execute();
  await db.schema.createIndex('sanitation_cycle_completed_at_idx').on('sanitation_cycle').column('completed_at').execute();
  await db.schema.createIndex('sanitation_cycle_recorded_by_idx').on('sanitation_cycle').column('recorded_by').execute();

  await db.schema
    .createTable('sanitation_step')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('cycle_id', 'uuid', (c) => c.notNull().references('sanitation_cycle.id').onDelete('cascade'))
    .addColumn('position', 'smallint', (c) => c.notNull())
    .addColumn('step', 'text', (c) => c.notNull().check(sql`step in ('clean','rinse','sanitize','purge')`))
    .addColumn('chemical_id', 'text')
    .addColumn('chemical', 'text')
    .addColumn('concentration', sql`numeric(10,3)`, (c) => c.check(sql`concentration is null or concentration > 0`))
    .addColumn('concentration_unit', 'text', (c) => c.check(sql`concentration_unit is null or concentration_unit in ('%','g/L','mL/L','ppm')`))
    .addColumn('contact_minutes', sql`numeric(8,2)`, (c) => c.check(sql`contact_minutes is null or contact_minutes >= 0`))
    .addColumn('minimum_contact_minutes', sql`numeric(8,2)`)
    .addColumn('purge_method', 'text', (c) => c.check(sql`purge_method is null or purge_method in ('flush','push_out')`))
    .addColumn('co2_grams', sql`numeric(8,1)`, (c) => c.check(sql`co2_grams is null or co2_grams >= 0`))
    .addColumn('solution_liters', sql`numeric(8,2)`, (c) => c.check(sql`solution_liters is null or solution_liters > 0`))
    .addColumn('performed_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('at', 'timestamptz', (c) => c.notNull())
    .addColumn('ok', 'boolean', (c) => c.notNull())
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addUniqueConstraint('sanitation_step_position_key', ['cycle_id', 'position'])
    .execute();
  await db.schema.createIndex('sanitation_step_performed_by_idx').on('sanitation_step').column('performed_by').execute();

  await db.schema
    .createTable('transfer')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('batch_id', 'uuid', (c) => c.notNull().references('batch.id'))
    .addColumn('from_equipment_id', 'uuid', (c) => c.notNull().references('equipment.id'))
    // Drawn from the fermenter; what reached the kegs; the difference (trub, samples, spills).
    .addColumn('volume_liters', sql`numeric(8,2)`, (c) => c.notNull().check(sql`volume_liters > 0`))
    .addColumn('packaged_liters', sql`numeric(8,2)`, (c) => c.notNull().check(sql`packaged_liters > 0`))
    .addColumn('loss_liters', sql`numeric(8,2)`, (c) => c.notNull().check(sql`loss_liters >= 0`))
    .addColumn('draw_method', 'text', (c) => c.notNull().check(sql`draw_method in ('bottom_valve','siphon')`))
    .addColumn('checklist', 'jsonb', (c) => c.notNull())
    .addColumn('finings_kind', 'text')
    .addColumn('finings_amount', sql`numeric(8,2)`, (c) => c.check(sql`finings_amount is null or finings_amount > 0`))
    .addColumn('finings_unit', 'text', (c) => c.check(sql`finings_unit is null or finings_unit in ('g','mL')`))
    .addColumn('co2_grams', sql`numeric(8,1)`, (c) =>
      c
        .notNull()
        .defaultTo(0)
        .check(sql`co2_grams >= 0`),
    )
    .addColumn('og', sql`numeric(5,4)`)
    .addColumn('fg', sql`numeric(5,4)`)
    .addColumn('abv', sql`numeric(5,2)`)
    .addColumn('transferred_at', 'timestamptz', (c) => c.notNull())
    .addColumn('recorded_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('transfer_volumes_check', sql`packaged_liters + loss_liters = volume_liters`)
    .addCheckConstraint('transfer_finings_check', sql`(finings_kind is null) = (finings_amount is null) and (finings_amount is null) = (finings_unit is null)`)
    .execute();
  await db.schema.createIndex('transfer_batch_id_idx').on('transfer').column('batch_id').execute();
  await db.schema.createIndex('transfer_from_equipment_idx').on('transfer').columns(['from_equipment_id', 'transferred_at']).execute();
  await db.schema.createIndex('transfer_transferred_at_idx').on('transfer').column('transferred_at').execute();

  await db.schema
    .createTable('keg_fill')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('transfer_id', 'uuid', (c) => c.references('transfer.id'))
    .addColumn('keg_id', 'uuid', (c) => c.notNull().references('equipment.id'))
    .addColumn('batch_id', 'uuid', (c) => c.notNull().references('batch.id'))
    .addColumn('volume_liters', sql`numeric(8,2)`, (c) => c.notNull().check(sql`volume_liters > 0`))
    // How full the co-op thinks the keg is (set at fill, updated by the brewer on duty).
    .addColumn('remaining_liters', sql`numeric(8,2)`, (c) => c.notNull().check(sql`remaining_liters >= 0`))
    .addColumn('og', sql`numeric(5,4)`)
    .addColumn('fg', sql`numeric(5,4)`)
    .addColumn('abv', sql`numeric(5,2)`)
    // The cycle that made the keg ready for this fill (null only in imported or corrected history).
    .addColumn('sanitation_cycle_id', 'uuid', (c) => c.references('sanitation_cycle.id'))
    .addColumn('co2_grams', sql`numeric(8,1)`, (c) => c.notNull().defaultTo(0))
    .addColumn('filled_at', 'timestamptz', (c) => c.notNull())
    .addColumn('emptied_at', 'timestamptz')
    .addColumn('emptied_reason', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('keg_fill_emptied_check', sql`emptied_at is null or emptied_at >= filled_at`)
    .execute();
  // A keg holds one fill at a time.
  await sql`create unique index keg_fill_one_open_per_keg on keg_fill (keg_id) where emptied_at is null`.execute(db);
  await db.schema.createIndex('keg_fill_keg_filled_idx').on('keg_fill').columns(['keg_id', 'filled_at']).execute();
  await db.schema.createIndex('keg_fill_batch_id_idx').on('keg_fill').column('batch_id').execute();
  await db.schema.createIndex('keg_fill_transfer_id_idx').on('keg_fill').column('transfer_id').execute();
  await db.schema.createIndex('keg_fill_cycle_id_idx').on('keg_fill').column('sanitation_cycle_id').execute();

  await db.schema
    .createTable('keg_whereabouts')
    .addColumn('keg_id', 'uuid', (c) => c.primaryKey().references('equipment.id').onDelete('cascade'))
    .addColumn('whereabouts', 'text', (c) => c.notNull().check(sql`whereabouts in ('cellar','cold_room','with_member','missing')`))
    .addColumn('tap_id', 'uuid', (c) => c.references('equipment.id'))
    .addColumn('member_id', 'uuid', (c) => c.references('app_user.id'))
    .addColumn('checked_out_at', 'timestamptz')
    .addColumn('due_at', 'timestamptz')
    .addColumn('since', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addCheckConstraint('keg_whereabouts_tap_check', sql`tap_id is null or whereabouts = 'cold_room'`)
    .addCheckConstraint(
      'keg_whereabouts_member_check',
      sql`(whereabouts = 'with_member') = (member_id is not null and due_at is not null and checked_out_at is not null)`,
    )
    .execute();
  // One keg per tap.
  await sql`create unique index keg_whereabouts_one_keg_per_tap on keg_whereabouts (tap_id) where tap_id is not null`.execute(db);
  await db.schema.createIndex('keg_whereabouts_member_idx').on('keg_whereabouts').columns(['member_id', 'due_at']).execute();
  await db.schema.createIndex('keg_whereabouts_due_idx').on('keg_whereabouts').column('due_at').execute();

  await db.schema
    .createTable('keg_movement')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('keg_id', 'uuid', (c) => c.notNull().references('equipment.id').onDelete('cascade'))
    .addColumn('action', 'text', (c) =>
      c.notNull().check(sql`action in ('checked_out','returned','moved','tapped','untapped','marked_missing','found','level','emptied')`),
    )
    .addColumn('from_whereabouts', 'text')
    .addColumn('to_whereabouts', 'text', (c) => c.notNull())
    .addColumn('tap_id', 'uuid', (c) => c.references('equipment.id'))
    .addColumn('member_id', 'uuid', (c) => c.references('app_user.id'))
    .addColumn('due_at', 'timestamptz')
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('actor_id', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('keg_movement_keg_at_idx').on('keg_movement').columns(['keg_id', 'at']).execute();
  await db.schema.createIndex('keg_movement_member_idx').on('keg_movement').column('member_id').execute();

  await db.schema
    .createTable('carbonation_plan')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('keg_id', 'uuid', (c) => c.notNull().references('equipment.id'))
    .addColumn('keg_fill_id', 'uuid', (c) => c.references('keg_fill.id'))
    .addColumn('state', 'text', (c) =>
      c
        .notNull()
        .defaultTo('active')
        .check(sql`state in ('active','done','cancelled','superseded')`),
    )
    .addColumn('method', 'text', (c) => c.notNull().check(sql`method in ('set_and_hold','fast_start')`))
    .addColumn('style_family', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('target_volumes', sql`numeric(4,2)`, (c) => c.notNull().check(sql`target_volumes > 0 and target_volumes <= 6`))
    .addColumn('temperature_c', sql`numeric(5,2)`, (c) => c.notNull())
    .addColumn('altitude_m', sql`numeric(7,1)`, (c) => c.notNull().defaultTo(0))
    .addColumn('serving_pressure_kpa', sql`numeric(7,2)`, (c) => c.notNull())
    .addColumn('fast_pressure_kpa', sql`numeric(7,2)`)
    .addColumn('fast_hours', sql`numeric(6,2)`)
    .addColumn('hold_days', sql`numeric(5,2)`)
    .addColumn('settle_days', sql`numeric(5,2)`)
    .addColumn('started_at', 'timestamptz', (c) => c.notNull())
    .addColumn('lower_pressure_at', 'timestamptz')
    .addColumn('ready_at', 'timestamptz', (c) => c.notNull())
    .addColumn('pressure_lowered_at', 'timestamptz')
    .addColumn('reminder_sent_at', 'timestamptz')
    .addColumn('reminder_job_id', 'text')
    .addColumn('tap_id', 'uuid', (c) => c.references('equipment.id'))
    .addColumn('line_length_m', sql`numeric(6,2)`)
    .addColumn('line_inside_diameter_mm', sql`numeric(5,2)`)
    .addColumn('line_rise_m', sql`numeric(5,2)`)
    .addColumn('line_resistance_kpa_per_m', sql`numeric(7,2)`)
    .addColumn('line_balanced_length_m', sql`numeric(6,2)`)
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint(
      'carbonation_plan_fast_start_check',
      sql`(method = 'fast_start') = (fast_pressure_kpa is not null and fast_hours is not null and lower_pressure_at is not null)`,
    )
    .execute();
  await sql`create unique index carbonation_plan_one_active_per_keg on carbonation_plan (keg_id) where state = 'active'`.execute(db);
  await db.schema.createIndex('carbonation_plan_keg_idx').on('carbonation_plan').columns(['keg_id', 'created_at']).execute();
  await db.schema.createIndex('carbonation_plan_fill_idx').on('carbonation_plan').column('keg_fill_id').execute();

  // Packaged volumes for the production records: a batch's transfers, or (for history recorded
  // before transfers were) the volume marked on the batch itself.
  await sql`create or replace view production_packaging as
    select t.batch_id as batch_id, t.transferred_at as packaged_at, t.packaged_liters as liters
    from transfer t join batch b on b.id = t.batch_id
    where b.status <> 'discarded'
    union all
    select b.id, b.packaged_at, b.packaged_liters
    from batch b
    where b.packaged_at is not null and b.packaged_liters is not null and b.status <> 'discarded'
      and not exists (select 1 from transfer t where t.batch_id = b.id)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`create or replace view production_packaging as
    select b.id as batch_id, b.packaged_at as packaged_at, b.packaged_liters as liters
    from batch b
    where b.packaged_at is not null and b.packaged_liters is not null and b.status <> 'discarded'`.execute(db);
  for (const t of ['carbonation_plan', 'keg_movement', 'keg_whereabouts', 'keg_fill', 'transfer', 'sanitation_step', 'sanitation_cycle']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
