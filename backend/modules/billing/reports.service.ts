import { sql } from 'kysely';
import { nextPeriod, periodBounds } from '../../../shared/billing/dates.ts';
import { ageingBuckets, type AgeingBucket, type AgeingReport, type BillingSummary } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { coopToday, getBillingProfile } from './billing-profile.service.ts';
import { listRuns } from './invoice-runs.service.ts';

const emptyBuckets = (): Record<AgeingBucket, number> => ({ '0-30': 0, '31-60': 0, '61-90': 0, '90+': 0 });

export function bucketFor(ageDays: number): AgeingBucket {
  if (ageDays <= 30) return '0-30';
  if (ageDays <= 60) return '31-60';
  if (ageDays <= 90) return '61-90';
  return '90+';
}

/**
 * Open amounts by age: what is still due on each issued invoice, by how many days have passed
 * since its invoice date (as of `asOf`), per member and in total.
 */
export async function ageingReport(db: Database, now: Date, asOf?: string): Promise<AgeingReport> {
  const [{ today }, profile] = await Promise.all([coopToday(db, now), getBillingProfile(db)]);
  const at = asOf ?? today;
  const rows = await db
    .selectFrom('invoice')
    .innerJoin('app_user', 'app_user.id', 'invoice.member_id')
    .select([
      'invoice.member_id',
      'app_user.name',
      sql<number>`(${at}::date - invoice.issued_on)`.as('age'),
      sql<number>`(invoice.total_cents - invoice.paid_cents - invoice.credited_cents)`.as('due'),
    ])
    .where('invoice.status', '=', 'issued')
    .where('invoice.issued_on', '<=', at)
    .where(sql<boolean>`invoice.total_cents - invoice.paid_cents - invoice.credited_cents > 0`)
    .execute();
  const byMember = new Map<string, { memberId: string; memberName: string; buckets: Record<AgeingBucket, number>; totalCents: number }>();
  const totals = emptyBuckets();
  for (const r of rows) {
    const b = bucketFor(r.age);
    const m = byMember.get(r.member_id) ?? { memberId: r.member_id, memberName: r.name, buckets: emptyBuckets(), totalCents: 0 };
    m.buckets[b] += r.due;
    m.totalCents += r.due;
    totals[b] += r.due;
    byMember.set(r.member_id, m);
  }
  return {
    asOf: at,
    currency: profile.currency,
    totals,
    totalCents: ageingBuckets.reduce((s, b) => s + totals[b], 0),
    rows: [...byMember.values()].sort((a, b) => b.totalCents - a.totalCents || a.memberName.localeCompare(b.memberName)),
  };
}

export async function billingSummary(db: Database, now: Date): Promise<BillingSummary> {
  const [{ today }, profile, ageing, runs] = await Promise.all([
    coopToday(db, now),
    getBillingProfile(db),
    ageingReport(db, now),
    listRuns(db, 1, { madeInvoices: true }),
  ]);
  const row = await db
    .selectFrom('invoice')
    .select([
      sql<number>`count(*) filter (where status = 'issued' and total_cents - paid_cents - credited_cents > 0)::int`.as('unpaid_count'),
      sql<number>`coalesce(sum(total_cents - paid_cents - credited_cents) filter (where status = 'issued' and total_cents - paid_cents - credited_cents > 0), 0)::int`.as(
        'unpaid_total',
      ),
      sql<number>`count(*) filter (where status = 'issued' and total_cents - paid_cents - credited_cents > 0 and due_on < ${today}::date)::int`.as(
        'overdue_count',
      ),
      sql<number>`coalesce(sum(total_cents - paid_cents - credited_cents) filter (where status = 'issued' and total_cents - paid_cents - credited_cents > 0 and due_on < ${today}::date), 0)::int`.as(
        'overdue_total',
      ),
      sql<number>`count(*) filter (where status = 'draft')::int`.as('drafts'),
    ])
    .executeTakeFirstOrThrow();
  const overpaid = await db
    .selectFrom('payment')
    .select([sql<number>`count(*)::int`.as('count'), sql<number>`coalesce(sum(overpaid_cents), 0)::int`.as('total')])
    .where('overpaid_cents', '>', 0)
    .where('overpayment_refunded_on', 'is', null)
    .executeTakeFirstOrThrow();
  // The last month that has ended.
  let suggested = nextPeriod(today.slice(0, 7), -1);
  if (periodBounds(suggested).next > today) suggested = nextPeriod(suggested, -1);
  return {
    currency: profile.currency,
    today,
    unpaid: { count: row.unpaid_count, totalCents: row.unpaid_total },
    overdue: { count: row.overdue_count, totalCents: row.overdue_total },
    drafts: row.drafts,
    ageing: ageing.totals,
    overpayments: { count: overpaid.count, totalCents: overpaid.total },
    lastRun: runs[0] ?? null,
    suggestedPeriod: suggested,
  };
}
