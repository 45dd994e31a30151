import { sql } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import { BILLING_PROFILE_KEY } from '../../backend/modules/billing/billing-profile.service.ts';
import { runPeriodIn } from '../../backend/modules/billing/invoice-runs.service.ts';
import { recordPayment, refundInvoice, voidInvoice } from '../../backend/modules/billing/invoices.service.ts';
import { addDays, periodLabel } from '../../shared/billing/dates.ts';
import { defaultBillingProfile, type PaymentMethod, type PriceItem } from '../../shared/schemas/billing.ts';
import { noonOf } from '../factories/common.ts';
import { userId } from './0001_users.ts';
import type { DemoCalendar } from './demo-calendar.ts';
import { rng, seedId } from './ids.ts';

/**
 * The co-op's price list, and its books for the two months before last (September and October 2026
 * as designed, for a today of 1 December 2026): both months run through the real invoice run on
 * their own dates (the 1st of the month after each), then paid, part paid, left unpaid, voided and
 * refunded as a volunteer treasurer's months go. The last month that has ended (November) is left
 * for the demo: it is ready to run. Runs after every other seed, so the charges come from the
 * demo's bookings, keg check-outs, transfers and cleaning cycles.
 *
 * The books go by calendar month, so their dates move with the demo's calendar by whole months
 * (`cal.monthDate`, `cal.period`), not by days as the cellar's records do.
 */

/** The price list as designed (dates as of a today of 1 December 2026; `note` may name a month). */
const prices: { item: PriceItem; band?: number; cents: number; from: string; note?: (month: (design: string) => string) => string }[] = [
  { item: 'fermenter_day', band: 30, cents: 150, from: '2026-01-01' },
  { item: 'fermenter_day', band: 60, cents: 250, from: '2026-01-01' },
  { item: 'fermenter_day', band: 60, cents: 275, from: '2026-10-15', note: (month) => `Agreed at the ${month('2026-10')} members’ meeting` },
  { item: 'fermenter_day', band: 120, cents: 400, from: '2026-01-01' },
  { item: 'keg_week', cents: 200, from: '2026-01-01' },
  { item: 'tap_week', cents: 600, from: '2026-01-01' },
  { item: 'co2_fill', cents: 120, from: '2026-01-01' },
  { item: 'co2_kg', cents: 380, from: '2027-01-01', note: (month) => `CO2 billed by weight from ${month('2027-01')}` },
  { item: 'cleaning', cents: 350, from: '2026-01-01' },
  { item: 'finings_dose', cents: 150, from: '2026-01-01' },
  { item: 'membership_month', cents: 1500, from: '2026-01-01' },
  { item: 'late_keg_day', cents: 100, from: '2026-01-01' },
];

const treasurer = userId('treasurer');

export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  /** A design date of the books, on the demo's calendar. */
  const day = (design: string) => cal.monthDate(design);
  /** An instant on a design date of the books, at an hour (UTC). */
  const at = (design: string, hour = 10) => new Date(`${day(design)}T${String(hour).padStart(2, '0')}:00:00Z`);
  /** The name of a design month on the demo's calendar ("October"). */
  const month = (design: string) => periodLabel(cal.period(design)).split(' ')[0]!;

  await db
    .insertInto('price')
    .values(
      prices.map((p, i) => ({
        id: seedId('price', i),
        item: p.item,
        band_max_liters: p.band ?? null,
        unit_cents: p.cents,
        effective_from: day(p.from),
        note: p.note?.(month) ?? '',
        created_by: treasurer,
        created_at: at(p.from < '2026-08-01' ? '2026-08-01' : '2026-10-10'),
      })),
    )
    .onConflict((oc) => oc.doNothing())
    .execute();
  await db
    .insertInto('tax_rate')
    .values({ id: seedId('tax_rate', 1), rate_bp: 800, label: 'VAT', effective_from: day('2026-01-01'), created_by: treasurer, created_at: at('2026-08-01') })
    .onConflict((oc) => oc.doNothing())
    .execute();
  await db
    .insertInto('setting')
    .values({ key: BILLING_PROFILE_KEY, value: JSON.stringify(defaultBillingProfile), updated_by: treasurer })
    .onConflict((oc) => oc.doNothing())
    .execute();

  // A charge for a part the co-op supplied, entered by hand before the September run.
  await db
    .insertInto('manual_charge')
    .values({
      id: seedId('manual_charge', 1),
      member_id: userId('member3'),
      period: cal.period('2026-09'),
      description: 'Keg O-ring kit, supplied',
      reason: 'Replacement seals fitted to a keg returned leaking at the lid',
      amount_cents: 450,
      created_by: treasurer,
      created_at: at('2026-09-28'),
    })
    .execute();

  const random = rng(6006);
  const september = await runPeriodIn(db, { period: cal.period('2026-09'), issue: true }, treasurer, { today: day('2026-10-01'), now: at('2026-10-01', 8) });
  await settleMonth(
    db,
    september.invoices,
    { issuedOn: day('2026-10-01'), lastDay: cal.lastDayOf('2026-10'), paidShare: 0.85, unpaid: ['member12', 'member20'], partPaid: ['member9'] },
    random,
  );

  // One September invoice carried keg check-outs and fills recorded against the wrong member:
  // voided, replaced by its credit note, and the member's own charges re-billed on the next month's invoice.
  const voided = september.invoices.find((i) => i.memberId === userId('member15'));
  if (voided) {
    const fair = Math.round(voided.subtotalCents * 0.6);
    await voidInvoice(
      db,
      voided.id,
      {
        reason: `Keg check-outs and fills were recorded against the wrong member; corrected charges follow on ${month('2026-10')}’s invoice`,
        refundMethod: 'bank_transfer',
      },
      day('2026-10-09'),
      treasurer,
      at('2026-10-09', 11),
    );
    await db
      .insertInto('manual_charge')
      .values({
        id: seedId('manual_charge', 2),
        member_id: userId('member15'),
        period: cal.period('2026-10'),
        description: `${month('2026-09')} use, corrected (replaces voided invoice)`,
        reason: `Invoice ${voided.number} was voided; these are its fair charges`,
        amount_cents: fair,
        created_by: treasurer,
        created_at: at('2026-10-09', 11),
      })
      .execute();
  }
  await db
    .insertInto('manual_charge')
    .values({
      id: seedId('manual_charge', 3),
      member_id: userId('member6'),
      period: cal.period('2026-10'),
      description: 'Goodwill credit',
      reason: 'Transfer delayed two days by the cold room being out of use',
      amount_cents: -500,
      created_by: treasurer,
      created_at: at('2026-10-27'),
    })
    .execute();

  const october = await runPeriodIn(db, { period: cal.period('2026-10'), issue: true }, treasurer, { today: day('2026-11-01'), now: at('2026-11-01', 8) });
  await settleMonth(
    db,
    october.invoices,
    { issuedOn: day('2026-11-01'), lastDay: cal.lastDayOf('2026-11'), paidShare: 0.6, unpaid: ['member12', 'member20', 'member3'], partPaid: ['member17'] },
    random,
  );

  // A refund: a cleaning fee waived after the member had paid, paid back by bank transfer.
  const refunded = october.invoices.find((i) => i.memberId === userId('member4'));
  if (refunded) {
    const inv = await db.selectFrom('invoice').select(['status', 'paid_cents', 'total_cents']).where('id', '=', refunded.id).executeTakeFirstOrThrow();
    if (inv.status === 'paid' && inv.paid_cents >= 378) {
      await refundInvoice(
        db,
        refunded.id,
        { amountCents: 378, reason: 'Cleaning fee waived: the vessel was cleaned by the member under supervision', refundMethod: 'bank_transfer' },
        day('2026-11-18'),
        treasurer,
        at('2026-11-18', 12),
      );
    }
  }

  // The books as they would look: documents dated when they were made, all sent on their issue day.
  await sql`update invoice set created_at = issued_on + time '08:00', sent_at = issued_on + time '09:30' where issued_on is not null`.execute(db);
  await sql`update invoice_run set created_at = (case period when ${cal.period('2026-09')} then ${day('2026-10-01')}::date else ${day('2026-11-01')}::date end) + time '08:00'`.execute(
    db,
  );
  await sql`update payment set created_at = received_on + time '12:00'`.execute(db);
  await sql`update credit_note set created_at = issued_on + time '12:00'`.execute(db);
  await sql`update invoice set paid_at = (select max(p.received_on) + time '12:00' from payment p where p.invoice_id = invoice.id and p.amount_cents > 0)
            where paid_at is not null and exists (select 1 from payment p where p.invoice_id = invoice.id and p.amount_cents > 0)`.execute(db);
  await sql`update invoice set voided_at = ${day('2026-10-09')}::date + time '11:00' where status = 'void'`.execute(db);
  await sql`update invoice set updated_at = greatest(created_at, sent_at, paid_at, voided_at,
              (select max(p.created_at) from payment p where p.invoice_id = invoice.id),
              (select max(c.created_at) from credit_note c where c.invoice_id = invoice.id))`.execute(db);
  // The audit trail of this seed (written in its transaction) dated as the books are, not when the demo was seeded.
  await sql`update audit_log a set at = coalesce(case a.action
              when 'ran' then (select r.created_at from invoice_run r where r.id::text = a.subject_id)
              when 'issued' then (select i.created_at from invoice i where i.id::text = a.subject_id)
              when 'voided' then (select i.voided_at from invoice i where i.id::text = a.subject_id)
              when 'credit_note_issued' then (select c.created_at from credit_note c where c.number = a.detail->>'creditNote')
              else (select p.created_at from payment p where p.id::text = a.detail->>'paymentId') end, a.at)
            where a.subject_type in ('Invoice', 'InvoiceRun') and a.at = now()`.execute(db);
}

async function settleMonth(
  db: Database,
  invoices: { id: string; memberId: string; totalCents: number; number: string | null }[],
  plan: { issuedOn: string; lastDay: string; paidShare: number; unpaid: string[]; partPaid: string[] },
  random: () => number,
) {
  const unpaid = new Set(plan.unpaid.map(userId));
  const part = new Set(plan.partPaid.map(userId));
  for (const inv of invoices) {
    if (inv.totalCents <= 0 || unpaid.has(inv.memberId)) continue;
    const r = random();
    const method: PaymentMethod = r < 0.5 ? 'bank_transfer' : r < 0.85 ? 'online' : 'cash';
    const day = addDays(plan.issuedOn, 2 + Math.floor(random() * 20));
    const receivedOn = day > plan.lastDay ? plan.lastDay : day;
    if (part.has(inv.memberId)) {
      const half = Math.round(inv.totalCents / 2);
      await recordPayment(
        db,
        inv.id,
        { amountCents: half, method: 'bank_transfer', receivedOn, reference: `${inv.number} part 1` },
        userId('treasurer'),
        noonOf(receivedOn),
      );
      continue;
    }
    if (random() > plan.paidShare) continue;
    await recordPayment(
      db,
      inv.id,
      {
        amountCents: inv.totalCents,
        method,
        receivedOn,
        reference: method === 'online' ? `pi_demo_${inv.id.slice(0, 8)}` : method === 'bank_transfer' ? `${inv.number}` : `Receipt ${inv.number}`,
        note: method === 'cash' ? 'Paid at the cellar open evening' : '',
      },
      method === 'online' ? null : userId('treasurer'),
      noonOf(receivedOn),
    );
  }
}
