import type { Insertable } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { ReminderTable } from '../../db/tables/reminders.ts';

/** The last reminder of an invoice or a keg that is still quiet at `now`, if any. */
export async function quietReminder(trx: Database, kind: 'invoice' | 'keg', targetId: string, now: Date) {
  return trx
    .selectFrom('reminder')
    .select(['sent_at', 'quiet_until'])
    .where(kind === 'invoice' ? 'invoice_id' : 'keg_id', '=', targetId)
    .where('quiet_until', '>', now)
    .orderBy('sent_at', 'desc')
    .executeTakeFirst();
}

/** Who a reminder goes to. */
export async function memberContact(trx: Database, memberId: string) {
  return trx.selectFrom('app_user').select(['name', 'email']).where('id', '=', memberId).executeTakeFirstOrThrow();
}

export async function insertReminder(trx: Database, values: Insertable<ReminderTable>): Promise<string> {
  return (await trx.insertInto('reminder').values(values).returning('id').executeTakeFirstOrThrow()).id;
}

/** Issued invoices with something due whose due day is before `today`, oldest first, and whether each is still quiet. */
export async function overdueInvoiceRows(db: Database, today: string, now: Date) {
  return db
    .selectFrom('invoice')
    .select((eb) => [
      'invoice.id',
      eb
        .exists(eb.selectFrom('reminder').select('reminder.id').whereRef('reminder.invoice_id', '=', 'invoice.id').where('reminder.quiet_until', '>', now))
        .as('quiet'),
    ])
    .where('invoice.status', '=', 'issued')
    .where((eb) => eb(eb('invoice.total_cents', '-', eb('invoice.paid_cents', '+', eb.ref('invoice.credited_cents'))), '>', 0))
    .where('invoice.due_on', '<', today)
    .orderBy('invoice.due_on')
    .orderBy('invoice.id')
    .execute();
}

/** A keg with its whereabouts, locked for the reminder's transaction. */
export async function lockKegWithHolder(trx: Database, kegId: string) {
  return trx
    .selectFrom('equipment as e')
    .innerJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
    .select(['e.id', 'e.code', 'e.name', 'kw.whereabouts', 'kw.member_id', 'kw.due_at', 'kw.checked_out_at'])
    .where('e.id', '=', kegId)
    .where('e.kind', '=', 'keg')
    .forUpdate()
    .executeTakeFirst();
}
