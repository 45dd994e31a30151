import type { Database } from '../../db/database.ts';

/** The run's id, or undefined when there is no such run. */
export function findRun(db: Database, runId: string) {
  return db.selectFrom('invoice_run').select('id').where('id', '=', runId).executeTakeFirst();
}

/** The run's issued invoices not yet e-mailed, in number order. */
export function unsentInvoicesOfRun(db: Database, runId: string) {
  return db
    .selectFrom('invoice')
    .select('id')
    .where('run_id', '=', runId)
    .where('status', 'in', ['issued', 'paid'])
    .where('sent_at', 'is', null)
    .orderBy('number_seq')
    .execute();
}
