import { type Kysely, sql } from 'kysely';

// The co-op's booking rules start with these values until an admin changes them on the Settings screen.
const initialBookingRules = {
  cleaningBufferHours: 24,
  maxDays: { fermenter: 35, keg: 56, tap: 42, co2_cylinder: 56 },
  maxAdvanceDays: 90,
  maxActiveBookingsPerMember: 10,
  timeZone: 'UTC',
};

export async function up(db: Kysely<any>): Promise<void> {
  await sql`insert into setting (key, value) values ('booking_rules', ${JSON.stringify(initialBookingRules)}::jsonb)
    on conflict (key) do nothing`.execute(db);

  // The calendar and an item's page read bookings by item and time.
  await db.schema.createIndex('booking_equipment_id_starts_at_idx').on('booking').columns(['equipment_id', 'starts_at']).execute();
  await db.schema.createIndex('equipment_state_change_actor_id_idx').on('equipment_state_change').column('actor_id').execute();

  await sql`alter table equipment_state_change
    add constraint equipment_state_change_state_check check (
      to_state in ('ready','needs_cleaning','cleaned','holding','out_of_service')
      and (from_state is null or from_state in ('ready','needs_cleaning','cleaned','holding','out_of_service'))
    )`.execute(db);
  await sql`alter table equipment_state_change add constraint equipment_state_change_reason_check check (length(btrim(reason)) > 0)`.execute(db);
  await sql`alter table equipment add constraint equipment_code_format_check check (code ~ '^[A-Z]{1,3}-[0-9]{1,4}$')`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table equipment drop constraint if exists equipment_code_format_check`.execute(db);
  await sql`alter table equipment_state_change drop constraint if exists equipment_state_change_reason_check`.execute(db);
  await sql`alter table equipment_state_change drop constraint if exists equipment_state_change_state_check`.execute(db);
  await db.schema.dropIndex('equipment_state_change_actor_id_idx').ifExists().execute();
  await db.schema.dropIndex('booking_equipment_id_starts_at_idx').ifExists().execute();
  await sql`delete from setting where key = 'booking_rules'`.execute(db);
}
