import { type Kysely, sql } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('equipment')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('code', 'text', (c) => c.notNull().unique())
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('fermenter','keg','tap','co2_cylinder')`))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('capacity_liters', sql`numeric(8,2)`, (c) => c.check(sql`capacity_liters is null or capacity_liters > 0`))
    .addColumn('state', 'text', (c) =>
      c
        .notNull()
        .defaultTo('needs_cleaning')
        .check(sql`state in ('ready','needs_cleaning','cleaned','holding','out_of_service')`),
    )
    .addColumn('attributes', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('state_changed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('equipment_kind_state_idx').on('equipment').columns(['kind', 'state']).execute();

  await db.schema
    .createTable('equipment_state_change')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('equipment_id', 'uuid', (c) => c.notNull().references('equipment.id').onDelete('cascade'))
    .addColumn('from_state', 'text')
    .addColumn('to_state', 'text', (c) => c.notNull())
    .addColumn('reason', 'text', (c) => c.notNull())
    .addColumn('actor_id', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('equipment_state_change_equipment_id_idx').on('equipment_state_change').columns(['equipment_id', 'at']).execute();

  await db.schema
    .createTable('booking')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('equipment_id', 'uuid', (c) => c.notNull().references('equipment.id'))
    .addColumn('owner_id', 'uuid', (c) => c.notNull().references('app_user.id'))
    .addColumn('batch_id', 'uuid')
    .addColumn('starts_at', 'timestamptz', (c) => c.notNull())
    .addColumn('ends_at', 'timestamptz', (c) => c.notNull())
    .addColumn('blocked_until', 'timestamptz', (c) => c.notNull())
    .addColumn('state', 'text', (c) =>
      c
        .notNull()
        .defaultTo('booked')
        .check(sql`state in ('booked','in_use','finished','cancelled')`),
    )
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('cancelled_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('cancelled_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('booking_period_check', sql`ends_at > starts_at and blocked_until >= ends_at`)
    .addCheckConstraint('booking_cancelled_check', sql`(state = 'cancelled') = (cancelled_at is not null)`)
    .execute();
  // No two live bookings of one item may overlap, cleaning buffer included: the database's guarantee.
  await sql`alter table booking add constraint booking_no_overlap
    exclude using gist (equipment_id with =, tstzrange(starts_at, blocked_until, '[)') with &&)
    where (state <> 'cancelled')`.execute(db);
  await db.schema.createIndex('booking_owner_id_idx').on('booking').columns(['owner_id', 'starts_at']).execute();
  await db.schema.createIndex('booking_starts_at_idx').on('booking').column('starts_at').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('booking').ifExists().execute();
  await db.schema.dropTable('equipment_state_change').ifExists().execute();
  await db.schema.dropTable('equipment').ifExists().execute();
}
