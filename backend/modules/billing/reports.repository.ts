import { sql } from 'kysely';
import type { Database } from '../../db/database.ts';
import { dueExpr, stillDue } from './invoice-queries.repository.ts';

/** Issued invoices with something still due, invoiced by `asOf`: their members, how many days old and what is due. */
export function openInvoiceAges(db: Database, asOf: string) {
  return db
    .selectFrom('invoice')
    .innerJoin('app_user', 'app_user.id', 'invoice.member_id')
    .select(['invoice.member_id', 'app_user.name', sql<number>`(${asOf}::date - invoice.issued_on)`.as('age'), dueExpr.as('due')])
    .where('invoice.status', '=', 'issued')
    .where('invoice.issued_on', '<=', asOf)
    .where(stillDue)
    .execute();
}

/** Unpaid and overdue (on `today`) issued invoices, counted and summed, and how many drafts wait. */
export function invoiceStandings(db: Database, today: string) {
  const unpaid = sql`invoice.status = 'issued' and ${stillDue}`;
  const overdue = sql`${unpaid} and invoice.due_on < ${today}::date`;
  return db
    .selectFrom('invoice')
    .select([
      sql<number>`count(*) filter (where ${unpaid})::int`.as('unpaid_count'),
      sql<number>`coalesce(sum(${dueExpr}) filter (where ${unpaid}), 0)::int`.as('unpaid_total'),
      sql<number>`count(*) filter (where ${overdue})::int`.as('overdue_count'),
      sql<number>`coalesce(sum(${dueExpr}) filter (where ${overdue}), 0)::int`.as('overdue_total'),
      sql<number>`count(*) filter (where invoice.status = 'draft')::int`.as('drafts'),
    ])
    .executeTakeFirstOrThrow();
}
