import { type Kysely, sql } from 'kysely';

/**
 * How a refractometer (Brix) reading was converted to a gravity: `wort` (no alcohol yet) or
 * `alcohol_corrected` (read through alcohol with the batch's original Brix). Null for hydrometer
 * readings (SG, °P). Stored Brix readings take the method they were converted by: the batch's
 * first reading as wort, later ones alcohol-corrected.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table reading add column method text`.execute(db);
  await sql`
    update reading r set method = case
      when r.taken_at = (select min(f.taken_at) from reading f where f.batch_id = r.batch_id) then 'wort'
      else 'alcohol_corrected' end
    where r.entered_unit = 'brix'`.execute(db);
  await sql`alter table reading add constraint reading_method_check check (method in ('wort','alcohol_corrected'))`.execute(db);
  await sql`alter table reading add constraint reading_method_brix_check check ((method is null) = (entered_unit <> 'brix'))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table reading drop constraint reading_method_brix_check`.execute(db);
  await sql`alter table reading drop constraint reading_method_check`.execute(db);
  await sql`alter table reading drop column method`.execute(db);
}
