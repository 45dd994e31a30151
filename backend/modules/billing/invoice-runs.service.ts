import { periodBounds, periodLabel, todayIn } from '../../../shared/billing/dates.ts';
import { sumLines } from '../../../shared/billing/money.ts';
import type { InvoicePreview, InvoiceRun, InvoiceSummary, RunPreview } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import type { Deps } from '../../lib/deps.ts';
import { HttpProblem, notFound } from '../../lib/http-problem.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { coopTimeZone, coopToday, getBillingProfile } from './billing-profile.service.ts';
import { deriveCharges, type PricedCharge } from './charges/index.ts';
import type { ChargeContext } from './charges/types.ts';
import { createInvoice, issueInvoice } from './invoice-commands.service.ts';
import { sendInvoice } from './invoice-mail.service.ts';
import { getSummary } from './invoice-queries.service.ts';
import {
  completeRun,
  draftsOfRun,
  findRun,
  insertRun,
  invoicedMembers,
  lockPeriod,
  runsQuery,
  unsentInvoicesOfRun,
  userNames,
} from './invoice-runs.repository.ts';
import { PriceBook } from './price-book.ts';

export { BILLING_LOCK } from './invoice-runs.repository.ts';

/**
 * When a run happens: the co-op's date to run as (the demo seed runs past months on their own
 * dates), or the clock's instant, whose date in the co-op's time zone is the run's day.
 */
export type RunClock = { today: string; now?: Date } | { now: Date; today?: string };

async function context(db: Database, period: string, clock: RunClock, memberIds?: string[]): Promise<ChargeContext & { today: string }> {
  const timeZone = await coopTimeZone(db);
  const today = clock.today ?? todayIn(timeZone, clock.now!);
  const { first, last, next } = periodBounds(period);
  return { period, first, last, next, timeZone, book: await PriceBook.load(db), today, ...(memberIds ? { memberIds } : {}) };
}

function periodProblems(period: string, today: string): string[] {
  const { next } = periodBounds(period);
  return next > today ? [`${periodLabel(period)} has not ended yet; it can be billed from ${next}.`] : [];
}

/** What a run of the period would bill, member by member, without writing anything. */
export async function previewRun(db: Database, period: string, clock: RunClock): Promise<RunPreview> {
  const ctx = await context(db, period, clock);
  const today = ctx.today;
  const [{ byMember, problems, sources }, profile, invoiced] = await Promise.all([deriveCharges(db, ctx), getBillingProfile(db), invoicedMembers(db, period)]);
  const names = await userNames(db, [...byMember.keys()]);
  const invoices: InvoicePreview[] = [...byMember.entries()]
    .map(([memberId, lines]) => ({
      memberId,
      memberName: names.get(memberId) ?? '',
      alreadyInvoiced: invoiced.has(memberId),
      lines: lines.map(stripDraft),
      ...sumLines(lines),
    }))
    .sort((a, b) => a.memberName.localeCompare(b.memberName));
  const allProblems = [...periodProblems(period, today), ...problems];
  return {
    period,
    currency: profile.currency,
    canRun: allProblems.length === 0,
    problems: allProblems,
    sources,
    invoices,
    totalCents: invoices.filter((i) => !i.alreadyInvoiced).reduce((s, i) => s + i.totalCents, 0),
  };
}

function stripDraft(l: PricedCharge) {
  const { memberId: _m, priceId: _p, taxable: _t, ...line } = l;
  return line;
}

/** A run writes invoices, so it takes the instant too: their stamps are the clock's `now`. */
type RunArgs = [input: { period: string; issue: boolean }, actorId: string, clock: RunClock & { now: Date }];

/**
 * Runs a period: one invoice per member with charges, made and (unless `issue` is false) issued in
 * one transaction. Members who already have an invoice for the period are skipped by the database's
 * unique constraint, so running twice, or twice at once, never bills anyone twice.
 */
export async function runPeriod(db: Database, ...args: RunArgs): Promise<{ run: InvoiceRun; invoices: InvoiceSummary[] }> {
  return db.transaction().execute((trx) => runPeriodIn(trx, ...args));
}

/** The run itself, inside the caller's transaction (the demo seed runs past months this way). */
export async function runPeriodIn(trx: Database, ...[input, actorId, clock]: RunArgs): Promise<{ run: InvoiceRun; invoices: InvoiceSummary[] }> {
  await lockPeriod(trx, input.period, 'shared');
  const ctx = await context(trx, input.period, clock);
  const today = ctx.today;
  const { byMember, problems } = await deriveCharges(trx, ctx);
  const all = [...periodProblems(input.period, today), ...problems];
  if (all.length) {
    throw new HttpProblem(409, 'The period cannot be billed yet', all.join(' '), undefined, 'about:blank', { problems: all });
  }
  const profile = await getBillingProfile(trx);
  const run = await insertRun(trx, { period: input.period, issued: input.issue, run_by: actorId });
  const made: string[] = [];
  // Members in a fixed order, so concurrent runs queue behind each other instead of deadlocking.
  for (const memberId of [...byMember.keys()].sort()) {
    const id = await createInvoice(trx, {
      runId: run.id,
      memberId,
      period: input.period,
      currency: profile.currency,
      lines: byMember.get(memberId)!,
      now: clock.now,
    });
    if (!id) continue;
    made.push(id);
    if (input.issue) await issueInvoice(trx, id, today, actorId, clock.now);
  }
  const invoices = await Promise.all(made.map((id) => getSummary(trx, id, today)));
  const total = invoices.reduce((s, i) => s + i.totalCents, 0);
  await completeRun(trx, run.id, { invoice_count: made.length, total_cents: total });
  await audit(trx, actorId, 'ran', 'InvoiceRun', run.id, { period: input.period, invoices: made.length, totalCents: total, issued: input.issue });
  return { run: toRun(await runsQuery(trx).where('invoice_run.id', '=', run.id).executeTakeFirstOrThrow()), invoices };
}

function toRun(r: Awaited<ReturnType<ReturnType<typeof runsQuery>['executeTakeFirstOrThrow']>>): InvoiceRun {
  return {
    id: r.id,
    period: r.period,
    issued: r.issued,
    invoiceCount: r.invoice_count,
    totalCents: r.total_cents,
    runBy: r.run_by ? { id: r.run_by, name: r.run_by_name ?? '' } : null,
    createdAt: r.created_at.toISOString(),
  };
}

export async function listRuns(db: Database, limit = 24, { madeInvoices = false } = {}): Promise<InvoiceRun[]> {
  let q = runsQuery(db).limit(limit);
  // A repeated run that found everyone billed already is kept in the log but is not "the last run".
  if (madeInvoices) q = q.where('invoice_run.invoice_count', '>', 0);
  return (await q.execute()).map(toRun);
}

/** Issues every draft of a run (for runs made as drafts to review first). */
export async function issueRunDrafts(db: Database, runId: string, actorId: string, now: Date): Promise<string[]> {
  return db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    const drafts = await draftsOfRun(trx, runId);
    for (const d of drafts) await issueInvoice(trx, d.id, today, actorId, now);
    await audit(trx, actorId, 'issued_drafts', 'InvoiceRun', runId, { count: drafts.length });
    return drafts.map((d) => d.id);
  });
}

async function existingRun(db: Database, runId: string) {
  const run = isUuid(runId) ? await findRun(db, runId) : undefined;
  if (!run) throw notFound('Invoice run');
  return run;
}

/** Issues every draft of an existing run; returns how many were issued. */
export async function issueRun(db: Database, runId: string, actorId: string, now: Date): Promise<number> {
  const run = await existingRun(db, runId);
  return (await issueRunDrafts(db, run.id, actorId, now)).length;
}

/** E-mails every issued invoice of an existing run that has not been sent yet; returns how many were queued. */
export async function sendRun(deps: Deps, runId: string, actorId: string): Promise<number> {
  const run = await existingRun(deps.db, runId);
  const unsent = await unsentInvoicesOfRun(deps.db, run.id);
  for (const inv of unsent) await sendInvoice(deps, inv.id, actorId);
  return unsent.length;
}
