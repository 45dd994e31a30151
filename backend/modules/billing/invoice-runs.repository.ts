import { sql } from 'kysely';
import type { Database } from '../../db/database.ts';

/** Advisory-lock namespace of billing periods. */
export const BILLING_LOCK = 7206;

/**
 * Takes the billing period's lock for the transaction: runs share it (so two runs really do race,
 * and the unique constraint decides); adding a manual charge takes it alone, so no charge slips in
 * while a run reads the period.
 */
export async function lockPeriod(trx: Database, period: string, mode: 'shared' | 'alone'): Promise<void> {
  if (mode === 'shared') await sql`select pg_advisory_xact_lock_shared(${BILLING_LOCK}, hashtext(${period}))`.execute(trx);
  else await sql`select pg_advisory_xact_lock(${BILLING_LOCK}, hashtext(${period}))`.execute(trx);
}

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

/** The run's drafts, by member. */
export function draftsOfRun(db: Database, runId: string) {
  return db.selectFrom('invoice').select('id').where('run_id', '=', runId).where('status', '=', 'draft').orderBy('member_id').execute();
}

/** The members who have an invoice for the period already. */
export async function invoicedMembers(db: Database, period: string): Promise<Set<string>> {
  const rows = await db.selectFrom('invoice').select('member_id').where('period', '=', period).execute();
  return new Set(rows.map((r) => r.member_id));
}

/** The names of these accounts, by id. */
export async function userNames(db: Database, ids: string[]): Promise<Map<string, string>> {
  if (ids.length === 0) return new Map();
  const rows = await db.selectFrom('app_user').select(['id', 'name']).where('id', 'in', ids).execute();
  return new Map(rows.map((r) => [r.id, r.name]));
}

export function insertRun(trx: Database, run: { period: string; issued: boolean; run_by: string }) {
  return trx.insertInto('invoice_run').values(run).returningAll().executeTakeFirstOrThrow();
}

/** Records what a run made. */
export async function completeRun(trx: Database, runId: string, made: { invoice_count: number; total_cents: number }): Promise<void> {
  await trx.updateTable('invoice_run').set(made).where('id', '=', runId).execute();
}

/** Runs with the name of who ran each, newest first. */
export function runsQuery(db: Database) {
  return db
    .selectFrom('invoice_run')
    .leftJoin('app_user', 'app_user.id', 'invoice_run.run_by')
    .selectAll('invoice_run')
    .select('app_user.name as run_by_name')
    .orderBy('invoice_run.created_at', 'desc');
}
