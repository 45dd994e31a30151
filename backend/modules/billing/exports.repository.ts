import type { Database } from '../../db/database.ts';
import { paymentsWithInvoices } from './payments.repository.ts';

/** The lines of the period's issued invoices (every status but draft), with their invoices and members, in number order. */
export function ledgerLines(db: Database, period: string) {
  return db
    .selectFrom('invoice_line as l')
    .innerJoin('invoice as i', 'i.id', 'l.invoice_id')
    .innerJoin('app_user as u', 'u.id', 'i.member_id')
    .selectAll('l')
    .select(['i.number', 'i.status', 'i.issued_on', 'i.due_on', 'i.currency', 'u.name as member', 'u.email'])
    .where('i.period', '=', period)
    .where('i.status', '<>', 'draft')
    .orderBy('i.number_year')
    .orderBy('i.number_seq')
    .orderBy('l.position')
    .execute();
}

/** The credit notes on the period's invoices, whenever they came, in number order. */
export function ledgerCreditNotes(db: Database, period: string) {
  return db
    .selectFrom('credit_note as c')
    .innerJoin('invoice as i', 'i.id', 'c.invoice_id')
    .innerJoin('app_user as u', 'u.id', 'c.member_id')
    .selectAll('c')
    .select(['i.number as invoice_number', 'u.name as member'])
    .where('i.period', '=', period)
    .orderBy('c.number_year')
    .orderBy('c.number_seq')
    .execute();
}

/** The payments on the period's invoices, whenever they came, in the order received. */
export function ledgerPayments(db: Database, period: string) {
  return paymentsWithInvoices(db)
    .selectAll('p')
    .select(['i.number as invoice_number', 'u.name as member'])
    .where('i.period', '=', period)
    .orderBy('p.received_on')
    .orderBy('p.created_at')
    .execute();
}
