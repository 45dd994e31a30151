import { type Kysely, sql } from 'kysely';

// Billing: the price list (effective-dated), tax rates, manual charges and credits, invoice runs,
// invoices with their lines, credit notes, payments, the online checkout sessions and the payment
// provider's processed events. Money is integer cents throughout.

const priceItems = `'fermenter_day','keg_week','tap_week','co2_fill','co2_kg','cleaning','finings_dose','membership_month','late_keg_day'`;
const lineItems = `${priceItems},'manual'`;

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('price')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('item', 'text', (c) => c.notNull().check(sql.raw(`item in (${priceItems})`)))
    // Fermenter-days are priced by capacity band: the band covers capacities up to this many litres.
    .addColumn('band_max_liters', 'integer', (c) => c.check(sql`band_max_liters is null or band_max_liters > 0`))
    .addColumn('unit_cents', 'integer', (c) => c.notNull().check(sql`unit_cents >= 0`))
    .addColumn('effective_from', 'date', (c) => c.notNull())
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('price_band_check', sql`(item = 'fermenter_day') = (band_max_liters is not null)`)
    .execute();
  await sql`create unique index price_item_band_effective_from_key on price (item, coalesce(band_max_liters, 0), effective_from)`.execute(db);

  await db.schema
    .createTable('tax_rate')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    // Basis points: 800 is 8.00 %; zero is allowed.
    .addColumn('rate_bp', 'integer', (c) => c.notNull().check(sql`rate_bp between 0 and 10000`))
    .addColumn('label', 'text', (c) => c.notNull().defaultTo('Tax'))
    .addColumn('effective_from', 'date', (c) => c.notNull().unique())
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  // Gapless numbers: one row per series and year, locked (updated) in the transaction that takes a number.
  await db.schema
    .createTable('document_number_counter')
    .addColumn('series', 'text', (c) => c.notNull().check(sql`series in ('invoice','credit_note')`))
    .addColumn('year', 'integer', (c) => c.notNull())
    .addColumn('last_value', 'integer', (c) => c.notNull().check(sql`last_value >= 0`))
    .addPrimaryKeyConstraint('document_number_counter_pkey', ['series', 'year'])
    .execute();

  await db.schema
    .createTable('invoice_run')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('period', 'text', (c) => c.notNull().check(sql`period ~ '^[0-9]{4}-(0[1-9]|1[0-2])$'`))
    .addColumn('issued', 'boolean', (c) => c.notNull())
    .addColumn('invoice_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('total_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('run_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('invoice_run_period_idx').on('invoice_run').columns(['period', 'created_at']).execute();

  await db.schema
    .createTable('invoice')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('run_id', 'uuid', (c) => c.references('invoice_run.id'))
    .addColumn('member_id', 'uuid', (c) => c.notNull().references('app_user.id'))
    .addColumn('period', 'text', (c) => c.notNull().check(sql`period ~ '^[0-9]{4}-(0[1-9]|1[0-2])$'`))
    .addColumn('status', 'text', (c) =>
      c
        .notNull()
        .defaultTo('draft')
        .check(sql`status in ('draft','issued','paid','void')`),
    )
    .addColumn('number', 'text', (c) => c.unique())
    .addColumn('number_year', 'integer')
    .addColumn('number_seq', 'integer')
    .addColumn('currency', 'char(3)', (c) => c.notNull())
    .addColumn('issued_on', 'date')
    .addColumn('due_on', 'date')
    .addColumn('subtotal_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('tax_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('total_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('paid_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('credited_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('sent_at', 'timestamptz')
    .addColumn('paid_at', 'timestamptz')
    .addColumn('voided_at', 'timestamptz')
    .addColumn('void_reason', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // The guarantee that no run, however many and however concurrent, bills a member twice for a period.
    .addUniqueConstraint('invoice_member_id_period_key', ['member_id', 'period'])
    .addCheckConstraint('invoice_total_check', sql`total_cents = subtotal_cents + tax_cents`)
    .addCheckConstraint(
      'invoice_number_check',
      sql`(number is null) = (number_year is null) and (number is null) = (number_seq is null)
          and (status = 'draft' or status = 'void' or number is not null)
          and (status <> 'draft' or number is null)
          and ((number is null) = (issued_on is null)) and ((issued_on is null) = (due_on is null))`,
    )
    .addCheckConstraint('invoice_paid_check', sql`(status = 'paid') = (paid_at is not null) or status = 'void'`)
    .addCheckConstraint('invoice_void_check', sql`(status = 'void') = (voided_at is not null)`)
    .execute();
  await db.schema.createIndex('invoice_number_year_seq_key').unique().on('invoice').columns(['number_year', 'number_seq']).execute();
  await db.schema.createIndex('invoice_period_status_idx').on('invoice').columns(['period', 'status']).execute();
  await db.schema.createIndex('invoice_run_id_idx').on('invoice').column('run_id').execute();

  await db.schema
    .createTable('invoice_line')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('invoice_id', 'uuid', (c) => c.notNull().references('invoice.id'))
    .addColumn('position', 'integer', (c) => c.notNull())
    .addColumn('item', 'text', (c) => c.notNull().check(sql.raw(`item in (${lineItems})`)))
    .addColumn('description', 'text', (c) => c.notNull())
    // The record the charge comes from, e.g. ('booking', <id>), and how the invoice names it ("F-07, 12–26 Nov, 14 days").
    .addColumn('source_type', 'text', (c) => c.notNull())
    .addColumn('source_id', 'text', (c) => c.notNull())
    .addColumn('source_label', 'text', (c) => c.notNull())
    .addColumn('service_from', 'date', (c) => c.notNull())
    .addColumn('service_to', 'date', (c) => c.notNull())
    .addColumn('quantity', sql`numeric(12,3)`, (c) => c.notNull())
    .addColumn('unit', 'text', (c) => c.notNull())
    .addColumn('unit_price_cents', 'integer', (c) => c.notNull())
    .addColumn('amount_cents', 'integer', (c) => c.notNull())
    .addColumn('tax_rate_bp', 'integer', (c) => c.notNull().check(sql`tax_rate_bp between 0 and 10000`))
    .addColumn('tax_cents', 'integer', (c) => c.notNull())
    .addColumn('price_id', 'uuid', (c) => c.references('price.id'))
    .addCheckConstraint('invoice_line_service_check', sql`service_to >= service_from`)
    .execute();
  await db.schema.createIndex('invoice_line_invoice_id_idx').on('invoice_line').columns(['invoice_id', 'position']).execute();
  // A piece of use (a source record's item from a date) is billed once, ever.
  await db.schema.createIndex('invoice_line_source_key').unique().on('invoice_line').columns(['source_type', 'source_id', 'item', 'service_from']).execute();

  await db.schema
    .createTable('manual_charge')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('member_id', 'uuid', (c) => c.notNull().references('app_user.id'))
    .addColumn('period', 'text', (c) => c.notNull().check(sql`period ~ '^[0-9]{4}-(0[1-9]|1[0-2])$'`))
    .addColumn('description', 'text', (c) => c.notNull().check(sql`length(btrim(description)) > 0`))
    .addColumn('reason', 'text', (c) => c.notNull().check(sql`length(btrim(reason)) > 0`))
    // Positive is a charge, negative a credit (both before tax).
    .addColumn('amount_cents', 'integer', (c) => c.notNull().check(sql`amount_cents <> 0`))
    .addColumn('taxable', 'boolean', (c) => c.notNull().defaultTo(true))
    .addColumn('invoice_line_id', 'uuid', (c) => c.references('invoice_line.id'))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('manual_charge_member_id_period_idx').on('manual_charge').columns(['member_id', 'period']).execute();

  await db.schema
    .createTable('credit_note')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('number', 'text', (c) => c.notNull().unique())
    .addColumn('number_year', 'integer', (c) => c.notNull())
    .addColumn('number_seq', 'integer', (c) => c.notNull())
    .addColumn('invoice_id', 'uuid', (c) => c.notNull().references('invoice.id'))
    .addColumn('member_id', 'uuid', (c) => c.notNull().references('app_user.id'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('void','refund')`))
    .addColumn('reason', 'text', (c) => c.notNull().check(sql`length(btrim(reason)) > 0`))
    .addColumn('issued_on', 'date', (c) => c.notNull())
    .addColumn('currency', 'char(3)', (c) => c.notNull())
    // Credited amounts are positive numbers.
    .addColumn('subtotal_cents', 'integer', (c) => c.notNull())
    .addColumn('tax_cents', 'integer', (c) => c.notNull())
    .addColumn('total_cents', 'integer', (c) => c.notNull().check(sql`total_cents > 0`))
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('credit_note_total_check', sql`total_cents = subtotal_cents + tax_cents`)
    .execute();
  await db.schema.createIndex('credit_note_number_year_seq_key').unique().on('credit_note').columns(['number_year', 'number_seq']).execute();
  await db.schema.createIndex('credit_note_invoice_id_idx').on('credit_note').column('invoice_id').execute();
  // A void invoice has exactly one void credit note.
  await sql`create unique index credit_note_void_invoice_key on credit_note (invoice_id) where kind = 'void'`.execute(db);

  await db.schema
    .createTable('credit_note_line')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('credit_note_id', 'uuid', (c) => c.notNull().references('credit_note.id'))
    .addColumn('position', 'integer', (c) => c.notNull())
    .addColumn('invoice_line_id', 'uuid', (c) => c.references('invoice_line.id'))
    .addColumn('description', 'text', (c) => c.notNull())
    .addColumn('amount_cents', 'integer', (c) => c.notNull())
    .addColumn('tax_rate_bp', 'integer', (c) => c.notNull())
    .addColumn('tax_cents', 'integer', (c) => c.notNull())
    .execute();
  await db.schema.createIndex('credit_note_line_credit_note_id_idx').on('credit_note_line').column('credit_note_id').execute();

  await db.schema
    .createTable('checkout_session')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('invoice_id', 'uuid', (c) => c.notNull().references('invoice.id'))
    .addColumn('amount_cents', 'integer', (c) => c.notNull().check(sql`amount_cents > 0`))
    .addColumn('currency', 'char(3)', (c) => c.notNull())
    .addColumn('url', 'text', (c) => c.notNull())
    .addColumn('status', 'text', (c) =>
      c
        .notNull()
        .defaultTo('open')
        .check(sql`status in ('open','complete','expired')`),
    )
    .addColumn('created_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('completed_at', 'timestamptz')
    .execute();
  await db.schema.createIndex('checkout_session_invoice_id_idx').on('checkout_session').column('invoice_id').execute();

  await db.schema
    .createTable('payment')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('invoice_id', 'uuid', (c) => c.notNull().references('invoice.id'))
    .addColumn('member_id', 'uuid', (c) => c.notNull().references('app_user.id'))
    .addColumn('method', 'text', (c) => c.notNull().check(sql`method in ('online','bank_transfer','cash')`))
    // Positive is money received; negative is money paid back (a refund, documented by a credit note).
    .addColumn('amount_cents', 'integer', (c) => c.notNull().check(sql`amount_cents <> 0`))
    .addColumn('currency', 'char(3)', (c) => c.notNull())
    .addColumn('received_on', 'date', (c) => c.notNull())
    .addColumn('reference', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('checkout_session_id', 'text', (c) => c.references('checkout_session.id'))
    .addColumn('credit_note_id', 'uuid', (c) => c.references('credit_note.id'))
    .addColumn('recorded_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('payment_refund_check', sql`(amount_cents < 0) = (credit_note_id is not null)`)
    .execute();
  await db.schema.createIndex('payment_invoice_id_idx').on('payment').column('invoice_id').execute();
  await db.schema.createIndex('payment_received_on_idx').on('payment').column('received_on').execute();
  // One completed checkout pays once, whichever of the provider's events reports it.
  await sql`create unique index payment_checkout_session_id_key on payment (checkout_session_id) where checkout_session_id is not null`.execute(db);

  // Every provider event processed, by its id: a replayed event finds its row and changes nothing.
  await db.schema
    .createTable('payment_event')
    .addColumn('event_id', 'text', (c) => c.primaryKey())
    .addColumn('type', 'text', (c) => c.notNull())
    .addColumn('outcome', 'text', (c) => c.notNull())
    .addColumn('invoice_id', 'uuid', (c) => c.references('invoice.id'))
    .addColumn('received_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of [
    'payment_event',
    'payment',
    'checkout_session',
    'credit_note_line',
    'credit_note',
    'manual_charge',
    'invoice_line',
    'invoice',
    'invoice_run',
    'document_number_counter',
    'tax_rate',
    'price',
  ]) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
