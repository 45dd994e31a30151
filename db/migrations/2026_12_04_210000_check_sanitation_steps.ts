import { type Kysely, sql } from 'kysely';

/**
 * Checked sanitation steps: a step that broke a rule of the co-op's chemical list or purge minimum
 * and was done anyway carries the reason and the rules it broke (`exception_reason`,
 * `exception_rules`); a caustic clean records that the vessel was vented first (`vented`); a
 * push-out purge records the keg it pushed into (`pushed_into_equipment_id`).
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    alter table sanitation_step
      add column exception_reason text,
      add column exception_rules text[] not null default '{}',
      add column vented boolean,
      add column pushed_into_equipment_id uuid references equipment(id)`.execute(db);
  await sql`alter table sanitation_step add constraint sanitation_step_exception_check
    check ((exception_reason is null) = (cardinality(exception_rules) = 0) and (exception_reason is null or length(btrim(exception_reason)) between 1 and 500))`.execute(
    db,
  );
  await sql`alter table sanitation_step add constraint sanitation_step_pushed_into_check
    check (pushed_into_equipment_id is null or purge_method = 'push_out')`.execute(db);
  await sql`alter table sanitation_step add constraint sanitation_step_vented_check check (vented is null or step = 'clean')`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table sanitation_step drop constraint sanitation_step_vented_check`.execute(db);
  await sql`alter table sanitation_step drop constraint sanitation_step_pushed_into_check`.execute(db);
  await sql`alter table sanitation_step drop constraint sanitation_step_exception_check`.execute(db);
  await sql`
    alter table sanitation_step
      drop column pushed_into_equipment_id,
      drop column vented,
      drop column exception_rules,
      drop column exception_reason`.execute(db);
}
