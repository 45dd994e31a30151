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
import { insertReminder, lockKegWithHolder, memberContact, overdueInvoiceRows, quietReminder } from './reminders.repository.ts';

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

/**
 * Writes the reminder row of an invoice or a keg unless the target is still quiet (409); the caller
 * queues the e-mail, then `sent()` writes the audit row and says what was sent.
 */
async function recordReminder(trx: Database, target: { kind: 'invoice' | 'keg'; id: string; memberId: string; what: string }, actorId: string, now: Date) {
  const last = await quietReminder(trx, target.kind, target.id, now);
  if (last) throw tooSoon(target.what, last);
  const member = await memberContact(trx, target.memberId);
  const quietUntil = new Date(now.getTime() + REMINDER_QUIET_MS);
  const id = await insertReminder(trx, {
    kind: target.kind,
    ...(target.kind === 'invoice' ? { invoice_id: target.id } : { keg_id: target.id }),
    member_id: target.memberId,
    sent_to: member.email,
    sent_by: actorId,
    sent_at: now,
    quiet_until: quietUntil,
  });
  const sent = async (): Promise<SentReminder> => {
    await audit(trx, actorId, 'reminded', target.kind === 'invoice' ? 'Invoice' : 'Keg', target.id, { to: member.email, reminderId: id });
    return { id, kind: target.kind, targetId: target.id, sentTo: member.email, sentAt: now.toISOString(), remindAgainAfter: quietUntil.toISOString() };
  };
  return { member, sent };
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
    const { member, sent } = await recordReminder(trx, { kind: 'invoice', id: inv.id, memberId: inv.member_id, what: `Invoice ${inv.number}` }, actorId, now);
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
    return sent();
  });
}

/** Overdue invoices (issued, something due, past their due day in the co-op's time zone), and which are still quiet. */
export async function overdueInvoices(db: Database, now: Date): Promise<{ id: string; quiet: boolean }[]> {
  const { today } = await coopToday(db, now);
  const rows = await overdueInvoiceRows(db, today, now);
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
    const keg = await lockKegWithHolder(trx, kegId);
    if (!keg) throw notFound('Keg');
    if (keg.whereabouts !== 'with_member' || !keg.member_id || !keg.due_at || keg.due_at.getTime() >= now.getTime()) {
      throw conflict(`Only a keg overdue back from a member is reminded; ${keg.code} is not overdue.`, { code: 'not_overdue' });
    }
    const { member, sent } = await recordReminder(trx, { kind: 'keg', id: keg.id, memberId: keg.member_id, what: `Keg ${keg.code}` }, actorId, now);
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
    return sent();
  });
}
