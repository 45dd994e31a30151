import { type Kysely, sql } from 'kysely';

/**
 * A transfer records when it started and ended (`ended_at` is `transferred_at`, which stays for the
 * readers that know only it; both null on transfers recorded before the times were), why it went
 * ahead while the gravity was not yet stable, and the dissolved oxygen read at fill (ppb) on the
 * transfer or per keg. A batch that is discarded records when, so the monthly production report
 * can count its beer as dumped in the right month.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table transfer
    add column started_at timestamptz,
    add column ended_at timestamptz,
    add column unstable_gravity_reason text,
    add column dissolved_oxygen_ppb numeric(6,1)`.execute(db);
  await sql`alter table transfer add constraint transfer_times_check check (
    (started_at is null) = (ended_at is null)
    and (ended_at is null or (ended_at > started_at and ended_at = transferred_at)))`.execute(db);
  await sql`alter table transfer add constraint transfer_unstable_reason_check check (
    unstable_gravity_reason is null or length(btrim(unstable_gravity_reason)) between 3 and 1000)`.execute(db);
  await sql`alter table transfer add constraint transfer_dissolved_oxygen_check check (
    dissolved_oxygen_ppb is null or dissolved_oxygen_ppb between 0 and 10000)`.execute(db);
  await sql`alter table keg_fill add column dissolved_oxygen_ppb numeric(6,1)`.execute(db);
  await sql`alter table keg_fill add constraint keg_fill_dissolved_oxygen_check check (
    dissolved_oxygen_ppb is null or dissolved_oxygen_ppb between 0 and 10000)`.execute(db);
  await sql`alter table batch add column discarded_at timestamptz`.execute(db);
  // Batches discarded before: their last change is the best time known.
  await sql`update batch set discarded_at = updated_at where status = 'discarded'`.execute(db);
  await sql`alter table batch add constraint batch_discarded_at_check check ((discarded_at is null) = (status <> 'discarded'))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table batch drop constraint batch_discarded_at_check, drop column discarded_at`.execute(db);
  await sql`alter table keg_fill drop constraint keg_fill_dissolved_oxygen_check, drop column dissolved_oxygen_ppb`.execute(db);
  await sql`alter table transfer
    drop constraint transfer_dissolved_oxygen_check,
    drop constraint transfer_unstable_reason_check,
    drop constraint transfer_times_check,
    drop column dissolved_oxygen_ppb,
    drop column unstable_gravity_reason,
    drop column ended_at,
    drop column started_at`.execute(db);
}
