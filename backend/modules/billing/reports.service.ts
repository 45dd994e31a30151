import { nextPeriod, periodBounds } from '../../../shared/billing/dates.ts';
import { ageingBuckets, type AgeingBucket, type AgeingReport, type BillingSummary } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { coopToday, getBillingProfile } from './billing-profile.service.ts';
import { openOverpayments } from './invoice-queries.repository.ts';
import { listRuns } from './invoice-runs.service.ts';
import { invoiceStandings, openInvoiceAges } from './reports.repository.ts';

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
  const rows = await openInvoiceAges(db, at);
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
  const [row, overpaid] = await Promise.all([invoiceStandings(db, today), openOverpayments(db)]);
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
