import { sql, type Expression, type SqlBool } from 'kysely';
import type { Database } from '../../db/database.ts';

/** What is still due on an invoice. */
export const dueExpr = sql<number>`(invoice.total_cents - invoice.paid_cents - invoice.credited_cents)`;

/** Something is still due on the invoice. */
export const stillDue = sql<SqlBool>`${dueExpr} > 0`;

/** Invoices with their members: what every read of an invoice starts from. */
export function invoiceBase(db: Database) {
  return db.selectFrom('invoice').innerJoin('app_user', 'app_user.id', 'invoice.member_id');
}

/** An invoice as lists and pages show it: its own columns, its member, what is due and when it was last reminded. */
export function withSummary(qb: ReturnType<typeof invoiceBase>) {
  return qb
    .selectAll('invoice')
    .select(['app_user.name as member_name', 'app_user.email as member_email', dueExpr.as('amount_due')])
    .select(sql<Date | null>`(select max(r.sent_at) from reminder r where r.invoice_id = invoice.id)`.as('last_reminded_at'));
}

export type SummaryRow = Awaited<ReturnType<ReturnType<typeof withSummary>['executeTakeFirstOrThrow']>>;

export function findSummaryRow(db: Database, id: string) {
  return withSummary(invoiceBase(db)).where('invoice.id', '=', id).executeTakeFirst();
}

/** The credit notes on these invoices, each with its invoice's number, in number order. */
export function creditNotesOfInvoices(db: Database, invoiceIds: string[]) {
  return db
    .selectFrom('credit_note')
    .innerJoin('invoice', 'invoice.id', 'credit_note.invoice_id')
    .selectAll('credit_note')
    .select('invoice.number as invoice_number')
    .where('credit_note.invoice_id', 'in', invoiceIds)
    .orderBy('credit_note.number_year')
    .orderBy('credit_note.number_seq')
    .execute();
}

/** The lines of these credit notes, in order. */
export function creditNoteLines(db: Database, noteIds: string[]) {
  return db.selectFrom('credit_note_line').selectAll().where('credit_note_id', 'in', noteIds).orderBy('position').execute();
}

/** An invoice's lines, in order. */
export function invoiceLines(db: Database, invoiceId: string) {
  return db.selectFrom('invoice_line').selectAll().where('invoice_id', '=', invoiceId).orderBy('position').execute();
}

/** An invoice's payments, in the order received. */
export function invoicePayments(db: Database, invoiceId: string) {
  return db.selectFrom('payment').selectAll().where('invoice_id', '=', invoiceId).orderBy('received_on').orderBy('created_at').execute();
}

/** Over every invoice ever issued to the member: the sum still due, how many are open and how many overdue on `today`. */
export function memberDues(db: Database, memberId: string, today: string) {
  const owed: Expression<SqlBool> = sql<SqlBool>`invoice.status in ('issued','paid','void') and invoice.issued_on is not null`;
  return db
    .selectFrom('invoice')
    .select([
      sql<number>`coalesce(sum(${dueExpr}), 0)::int`.as('balance'),
      sql<number>`count(*) filter (where invoice.status = 'issued' and ${dueExpr} > 0)::int`.as('open'),
      sql<number>`count(*) filter (where invoice.status = 'issued' and ${dueExpr} > 0 and invoice.due_on < ${today}::date)::int`.as('overdue'),
    ])
    .where('member_id', '=', memberId)
    .where(owed)
    .executeTakeFirstOrThrow();
}

/** Money paid beyond what was due and not yet refunded: how many payments and how much, of one member or of all. */
export function openOverpayments(db: Database, memberId?: string) {
  let q = db
    .selectFrom('payment')
    .select([sql<number>`count(*)::int`.as('count'), sql<number>`coalesce(sum(overpaid_cents), 0)::int`.as('total')])
    .where('overpaid_cents', '>', 0)
    .where('overpayment_refunded_on', 'is', null);
  if (memberId) q = q.where('member_id', '=', memberId);
  return q.executeTakeFirstOrThrow();
}
