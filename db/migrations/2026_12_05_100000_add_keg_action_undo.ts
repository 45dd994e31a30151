import { type Kysely, sql } from 'kysely';

/**
 * What undoing a keg's return, emptying or dump needs: the keg's state, whereabouts and fill before
 * the action, the carbonation plans it closed and the tap it came off (with that tap's state), and the
 * rows the action wrote last, so an undo can tell whether the keg was touched since. An undo is offered
 * until `undo_until` (the app's clock) and happens at most once. Undoing writes a keg movement `undone`.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table keg_movement drop constraint if exists keg_movement_action_check`.execute(db);
  await sql`alter table keg_movement add constraint keg_movement_action_check check (
    action in ('checked_out','returned','moved','tapped','untapped','marked_missing','found','level','emptied','undone'))`.execute(db);
  await db.schema
    .createTable('keg_action_undo')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('keg_id', 'uuid', (c) => c.notNull().references('equipment.id').onDelete('cascade'))
    .addColumn('action', 'text', (c) => c.notNull().check(sql`action in ('returned','emptied','dumped')`))
    .addColumn('movement_id', 'bigint', (c) => c.notNull().references('keg_movement.id').onDelete('cascade'))
    .addColumn('keg_state_change_id', 'bigint')
    .addColumn('keg_state', 'text', (c) => c.notNull())
    .addColumn('whereabouts', 'text', (c) => c.notNull().check(sql`whereabouts in ('cellar','cold_room','with_member','missing')`))
    .addColumn('tap_id', 'uuid', (c) => c.references('equipment.id'))
    .addColumn('tap_state', 'text')
    .addColumn('tap_state_change_id', 'bigint')
    .addColumn('member_id', 'uuid', (c) => c.references('app_user.id'))
    .addColumn('checked_out_at', 'timestamptz')
    .addColumn('due_at', 'timestamptz')
    .addColumn('since', 'timestamptz')
    .addColumn('fill_id', 'uuid', (c) => c.references('keg_fill.id').onDelete('cascade'))
    .addColumn('fill_remaining_liters', sql`numeric(8,2)`, (c) => c.check(sql`fill_remaining_liters >= 0`))
    .addColumn('plan_ids', sql`uuid[]`, (c) => c.notNull().defaultTo(sql`'{}'::uuid[]`))
    .addColumn('actor_id', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('at', 'timestamptz', (c) => c.notNull())
    .addColumn('undo_until', 'timestamptz', (c) => c.notNull())
    .addColumn('undone_at', 'timestamptz')
    .addColumn('undone_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('keg_action_undo_window_check', sql`undo_until > at and undo_until <= at + interval '10 minutes'`)
    .addCheckConstraint('keg_action_undo_fill_check', sql`(fill_id is null) = (fill_remaining_liters is null)`)
    .addCheckConstraint('keg_action_undo_tap_check', sql`(tap_id is null) = (tap_state is null) and (tap_id is null or whereabouts = 'cold_room')`)
    .addCheckConstraint(
      'keg_action_undo_member_check',
      sql`(whereabouts = 'with_member') = (member_id is not null and due_at is not null and checked_out_at is not null)`,
    )
    .addCheckConstraint('keg_action_undo_undone_check', sql`(undone_at is null) or (undone_at >= at and undone_at <= undo_until)`)
    .execute();
  await db.schema.createIndex('keg_action_undo_keg_idx').on('keg_action_undo').columns(['keg_id', 'at']).execute();
  await db.schema.createIndex('keg_action_undo_movement_idx').on('keg_action_undo').column('movement_id').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('keg_action_undo').ifExists().execute();
  await sql`delete from keg_movement where action = 'undone'`.execute(db);
  await sql`alter table keg_movement drop constraint if exists keg_movement_action_check`.execute(db);
  await sql`alter table keg_movement add constraint keg_movement_action_check check (
    action in ('checked_out','returned','moved','tapped','untapped','marked_missing','found','level','emptied'))`.execute(db);
}
