import { type Kysely, sql } from 'kysely';

/**
 * Paying once: an invoice has at most one open checkout session (older duplicates are closed here,
 * newest kept), and money received beyond what an invoice still owed is kept on the payment as
 * `overpaid_cents`: not counted in the invoice's `paid_cents`, owed back to the member until the
 * treasurer records that it was refunded.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`update checkout_session s set status = 'expired'
    where s.status = 'open'
      and exists (select 1 from checkout_session n
                  where n.invoice_id = s.invoice_id and n.status = 'open'
                    and (n.created_at, n.id) > (s.created_at, s.id))`.execute(db);
  await sql`create unique index checkout_session_one_open_per_invoice_key on checkout_session (invoice_id) where status = 'open'`.execute(db);

  await db.schema
    .alterTable('payment')
    .addColumn('overpaid_cents', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('overpayment_refunded_on', 'date')
    .addColumn('overpayment_refund_reference', 'text')
    .addColumn('overpayment_refunded_by', 'uuid', (c) => c.references('app_user.id').onDelete('set null'))
    .execute();
  await db.schema
    .alterTable('payment')
    .addCheckConstraint('payment_overpaid_check', sql`overpaid_cents >= 0 and overpaid_cents <= greatest(amount_cents, 0)`)
    .execute();
  await db.schema
    .alterTable('payment')
    .addCheckConstraint('payment_overpayment_refund_check', sql`overpayment_refunded_on is null or overpaid_cents > 0`)
    .execute();
  await sql`create index payment_overpaid_idx on payment (received_on) where overpaid_cents > 0`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists payment_overpaid_idx`.execute(db);
  await db.schema.alterTable('payment').dropConstraint('payment_overpayment_refund_check').ifExists().execute();
  await db.schema.alterTable('payment').dropConstraint('payment_overpaid_check').ifExists().execute();
  await db.schema
    .alterTable('payment')
    .dropColumn('overpayment_refunded_by')
    .dropColumn('overpayment_refund_reference')
    .dropColumn('overpayment_refunded_on')
    .dropColumn('overpaid_cents')
    .execute();
  await sql`drop index if exists checkout_session_one_open_per_invoice_key`.execute(db);
}
