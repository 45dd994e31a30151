import type PgBoss from 'pg-boss';
import { formatMoney } from '../../../shared/billing/money.ts';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound } from '../../lib/http-problem.ts';
import { enqueueMailIn } from '../../lib/mailer.ts';
import { lockInvoice } from '../billing/invoices.service.ts';
import { invoiceReminderMail } from '../mail/templates/invoice-reminder.ts';
import { kegReminderMail } from '../mail/templates/keg-reminder.ts';
import { coopProfile, coopToday, getBillingProfile } from '../settings/settings.service.ts';

/** After a reminder, its invoice or keg is not reminded again for this long (by the app's clock). */
export const REMINDER_QUIET_MS = 24 * 3600_000;

export interface ReminderDeps {
  db: Database;
  queue: PgBoss;
  config: Config;
}

export interface SentReminder {
  id: string;
  kind: 'invoice' | 'keg';
  targetId: string;
  sentTo: string;
  sentAt: string;
  remindAgainAfter: string;
}

const isExclusionViolation = (err: unknown) => (err as { code?: string }).code === '23P01';

/** 409 while the last reminder of the target is still quiet: a second one within the quiet time is refused. */
function tooSoon(what: string, last: { sent_at: Date; quiet_until: Date }) {
  return conflict(`${what} was reminded at ${last.sent_at.toISOString()}; another reminder can be sent from ${last.quiet_until.toISOString()}.`, {
    code: 'reminded_recently',
    lastRemindedAt: last.sent_at.toISOString(),
    remindAgainAfter: last.quiet_until.toISOString(),
  });
}

async function quietReminder(trx: Database, target: { invoiceId?: string; kegId?: string }, now: Date) {
  let q = trx.selectFrom('reminder').select(['sent_at', 'quiet_until']).where('quiet_until', '>', now).orderBy('sent_at', 'desc');
  q = target.invoiceId ? q.where('invoice_id', '=', target.invoiceId) : q.where('keg_id', '=', target.kegId!);
  return q.executeTakeFirst();
}

/**
 * Runs one reminder in a transaction under the target's row lock: the check gives the friendly 409,
 * the exclusion constraint on the reminders' quiet times is the guarantee (a concurrent duplicate
 * that slips past gets the same 409), and the e-mail is queued in the same transaction.
 */
async function inTransaction<T>(db: Database, what: string, work: (trx: Database) => Promise<T>): Promise<T> {
  try {
    return await db.transaction().execute(work);
  } catch (err) {
    if (isExclusionViolation(err)) throw conflict(`${what} was reminded a moment ago.`, { code: 'reminded_recently' });
    throw err;
  }
}

/** Reminds the member of an overdue invoice by e-mail (queued), once per quiet time. */
export async function remindInvoice(deps: ReminderDeps, invoiceId: string, actorId: string, now: Date): Promise<SentReminder> {
  const { db, queue, config } = deps;
  return inTransaction(db, 'This invoice', async (trx) => {
    const inv = await lockInvoice(trx, invoiceId);
    const { today, timeZone } = await coopToday(trx, now);
    const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
    if (inv.status !== 'issued' || due <= 0 || !inv.due_on || inv.due_on >= today) {
      throw conflict(
        `Only an overdue invoice is reminded; ${inv.number ?? 'this one'} is ${inv.status === 'issued' && due > 0 ? `due on ${inv.due_on}` : inv.status}.`,
        { code: 'not_overdue' },
      );
    }
    const last = await quietReminder(trx, { invoiceId }, now);
    if (last) throw tooSoon(`Invoice ${inv.number}`, last);
    const member = await trx.selectFrom('app_user').select(['name', 'email']).where('id', '=', inv.member_id).executeTakeFirstOrThrow();
    const quietUntil = new Date(now.getTime() + REMINDER_QUIET_MS);
    const row = await trx
      .insertInto('reminder')
      .values({ kind: 'invoice', invoice_id: inv.id, member_id: inv.member_id, sent_to: member.email, sent_by: actorId, sent_at: now, quiet_until: quietUntil })
      .returning('id')
      .executeTakeFirstOrThrow();
    const profile = await getBillingProfile(trx);
    const amount = formatMoney(due, inv.currency.trim(), 'en-GB');
    await enqueueMailIn(trx, queue, {
      to: member.email,
      ...invoiceReminderMail({
        profile,
        appUrl: config.publicUrl,
        timeZone,
        now,
        memberName: member.name,
        invoice: { id: inv.id, number: inv.number, period: inv.period, dueOn: inv.due_on },
        amount,
      }),
    });
    await audit(trx, actorId, 'reminded', 'Invoice', inv.id, { to: member.email, reminderId: row.id });
    return { id: row.id, kind: 'invoice', targetId: inv.id, sentTo: member.email, sentAt: now.toISOString(), remindAgainAfter: quietUntil.toISOString() };
  });
}

/** Overdue invoices (issued, something due, past their due day in the co-op's time zone), and which are still quiet. */
export async function overdueInvoices(db: Database, now: Date): Promise<{ id: string; quiet: boolean }[]> {
  const { today } = await coopToday(db, now);
  const rows = await db
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
  return rows.map((r) => ({ id: r.id, quiet: Boolean(r.quiet) }));
}

/** Reminds every overdue invoice not reminded within the quiet time; each in its own transaction. */
export async function remindAllOverdueInvoices(
  deps: ReminderDeps,
  actorId: string,
  now: Date,
): Promise<{ sent: number; skipped: number; reminders: SentReminder[] }> {
  const overdue = await overdueInvoices(deps.db, now);
  const reminders: SentReminder[] = [];
  let skipped = 0;
  for (const inv of overdue) {
    if (inv.quiet) {
      skipped++;
      continue;
    }
    try {
      reminders.push(await remindInvoice(deps, inv.id, actorId, now));
    } catch (err) {
      // Paid, or reminded by someone else, since the list was read: nothing to send.
      if ((err as { status?: number }).status !== 409) throw err;
      skipped++;
    }
  }
  return { sent: reminders.length, skipped, reminders };
}

/** Reminds the member who has a keg out past its due time to bring it back (queued), once per quiet time. */
export async function remindKeg(deps: ReminderDeps, kegId: string, actorId: string, now: Date): Promise<SentReminder> {
  const { db, queue, config } = deps;
  return inTransaction(db, 'This keg', async (trx) => {
    const keg = await trx
      .selectFrom('equipment as e')
      .innerJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
      .select(['e.id', 'e.code', 'e.name', 'kw.whereabouts', 'kw.member_id', 'kw.due_at', 'kw.checked_out_at'])
      .where('e.id', '=', kegId)
      .where('e.kind', '=', 'keg')
      .forUpdate()
      .executeTakeFirst();
    if (!keg) throw notFound('Keg');
    if (keg.whereabouts !== 'with_member' || !keg.member_id || !keg.due_at || keg.due_at.getTime() >= now.getTime()) {
      throw conflict(`Only a keg overdue back from a member is reminded; ${keg.code} is not overdue.`, { code: 'not_overdue' });
    }
    const last = await quietReminder(trx, { kegId }, now);
    if (last) throw tooSoon(`Keg ${keg.code}`, last);
    const member = await trx.selectFrom('app_user').select(['name', 'email']).where('id', '=', keg.member_id).executeTakeFirstOrThrow();
    const quietUntil = new Date(now.getTime() + REMINDER_QUIET_MS);
    const row = await trx
      .insertInto('reminder')
      .values({ kind: 'keg', keg_id: keg.id, member_id: keg.member_id, sent_to: member.email, sent_by: actorId, sent_at: now, quiet_until: quietUntil })
      .returning('id')
      .executeTakeFirstOrThrow();
    const { coopName, timeZone } = await coopProfile(trx);
    await enqueueMailIn(trx, queue, {
      to: member.email,
      ...kegReminderMail({
        coopName,
        appUrl: config.publicUrl,
        timeZone,
        memberName: member.name,
        keg: { id: keg.id, code: keg.code, name: keg.name, dueAt: keg.due_at, checkedOutAt: keg.checked_out_at },
      }),
    });
    await audit(trx, actorId, 'reminded', 'Keg', keg.id, { to: member.email, reminderId: row.id });
    return { id: row.id, kind: 'keg', targetId: keg.id, sentTo: member.email, sentAt: now.toISOString(), remindAgainAfter: quietUntil.toISOString() };
  });
}
