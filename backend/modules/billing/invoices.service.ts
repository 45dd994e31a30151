import { sql, type Expression, type SqlBool } from 'kysely';
import { addDays } from '../../../shared/billing/dates.ts';
import { splitGross } from '../../../shared/billing/money.ts';
import type {
  CreditNote,
  InvoiceDetail,
  InvoiceListQuery,
  InvoiceSummary,
  MemberBalance,
  Payment,
  PaymentMethod,
  RefundInput,
  VoidInvoiceInput,
} from '../../../shared/schemas/billing.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { getBillingProfile } from './billing-profile.service.ts';
import type { PricedCharge } from './charges/index.ts';
import { takeNumber } from './numbering.ts';
import { isUuid } from '../../lib/uuid-params.ts';

const dueExpr = sql<number>`(invoice.total_cents - invoice.paid_cents - invoice.credited_cents)`;

const sortColumns = {
  createdAt: sql`invoice.created_at`,
  number: sql`invoice.number`,
  issuedOn: sql`invoice.issued_on`,
  dueOn: sql`invoice.due_on`,
  period: sql`invoice.period`,
  member: sql`app_user.name`,
  total: sql`invoice.total_cents`,
  amountDue: dueExpr,
  status: sql`invoice.status`,
} as const;

function summaryQuery(db: Database) {
  return db
    .selectFrom('invoice')
    .innerJoin('app_user', 'app_user.id', 'invoice.member_id')
    .select([
      'invoice.id',
      'invoice.number',
      'invoice.period',
      'invoice.status',
      'invoice.member_id',
      'app_user.name as member_name',
      'app_user.email as member_email',
      'invoice.currency',
      'invoice.issued_on',
      'invoice.due_on',
      'invoice.subtotal_cents',
      'invoice.tax_cents',
      'invoice.total_cents',
      'invoice.paid_cents',
      'invoice.credited_cents',
      'invoice.sent_at',
      'invoice.paid_at',
      'invoice.voided_at',
      'invoice.created_at',
      'invoice.void_reason',
      'invoice.run_id',
      sql<Date | null>`(select max(r.sent_at) from reminder r where r.invoice_id = invoice.id)`.as('last_reminded_at'),
    ]);
}

type SummaryRow = Awaited<ReturnType<ReturnType<typeof summaryQuery>['executeTakeFirstOrThrow']>>;

export function toSummary(r: SummaryRow, today: string): InvoiceSummary {
  const amountDueCents = r.total_cents - r.paid_cents - r.credited_cents;
  return {
    id: r.id,
    number: r.number,
    period: r.period,
    status: r.status,
    memberId: r.member_id,
    memberName: r.member_name,
    memberEmail: r.member_email,
    currency: r.currency.trim(),
    issuedOn: r.issued_on,
    dueOn: r.due_on,
    subtotalCents: r.subtotal_cents,
    taxCents: r.tax_cents,
    totalCents: r.total_cents,
    paidCents: r.paid_cents,
    creditedCents: r.credited_cents,
    amountDueCents,
    overdue: r.status === 'issued' && amountDueCents > 0 && r.due_on !== null && r.due_on < today,
    sentAt: r.sent_at?.toISOString() ?? null,
    paidAt: r.paid_at?.toISOString() ?? null,
    voidedAt: r.voided_at?.toISOString() ?? null,
    createdAt: r.created_at.toISOString(),
    lastRemindedAt: r.last_reminded_at ? new Date(r.last_reminded_at).toISOString() : null,
  };
}

export interface InvoiceScope {
  /** Only this member's invoices, and none of their drafts (a member's own view). */
  ownerId?: string;
}

export async function listInvoices(db: Database, q: InvoiceListQuery, scope: InvoiceScope, today: string): Promise<Page<InvoiceSummary>> {
  let base = summaryQuery(db);
  if (scope.ownerId) base = base.where('invoice.member_id', '=', scope.ownerId).where('invoice.status', '<>', 'draft');
  if (q.period) base = base.where('invoice.period', '=', q.period);
  if (q.status) base = base.where('invoice.status', '=', q.status);
  if (q.memberId) base = base.where('invoice.member_id', '=', q.memberId);
  if (q.unpaid) base = base.where('invoice.status', '=', 'issued').where(sql<SqlBool>`${dueExpr} > 0`);
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base = base.where((eb) => eb.or([eb('invoice.number', 'ilike', like), eb('app_user.name', 'ilike', like), eb('app_user.email', 'ilike', like)]));
  }
  const dir = q.order === 'desc' ? sql`desc nulls last` : sql`asc nulls last`;
  const [{ total }, rows] = await Promise.all([
    base
      .clearSelect()
      .select((eb) => eb.fn.countAll<number>().as('total'))
      .executeTakeFirstOrThrow(),
    base
      .orderBy(sql`${sortColumns[q.sort]} ${dir}`)
      .orderBy('invoice.id')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  return { items: rows.map((r) => toSummary(r, today)), total, page: q.page, pageSize: q.pageSize };
}

export async function findInvoiceRow(db: Database, id: string) {
  if (!isUuid(id)) return undefined;
  return summaryQuery(db).where('invoice.id', '=', id).executeTakeFirst();
}

export async function getSummary(db: Database, id: string, today: string): Promise<InvoiceSummary> {
  const row = await findInvoiceRow(db, id);
  if (!row) throw notFound('Invoice');
  return toSummary(row, today);
}

function toPayment(p: {
  id: string;
  invoice_id: string;
  method: PaymentMethod;
  amount_cents: number;
  currency: string;
  received_on: string;
  reference: string;
  note: string;
  credit_note_id: string | null;
  created_at: Date;
  overpaid_cents: number;
  overpayment_refunded_on: string | null;
}): Payment {
  return {
    id: p.id,
    invoiceId: p.invoice_id,
    method: p.method,
    amountCents: p.amount_cents,
    currency: p.currency.trim(),
    receivedOn: p.received_on,
    reference: p.reference,
    note: p.note,
    creditNoteId: p.credit_note_id,
    createdAt: p.created_at.toISOString(),
    overpaidCents: p.overpaid_cents,
    overpaymentRefundedOn: p.overpayment_refunded_on,
  };
}

export async function creditNotesOf(db: Database, invoiceIds: string[]): Promise<CreditNote[]> {
  if (invoiceIds.length === 0) return [];
  const notes = await db
    .selectFrom('credit_note')
    .innerJoin('invoice', 'invoice.id', 'credit_note.invoice_id')
    .selectAll('credit_note')
    .select('invoice.number as invoice_number')
    .where('credit_note.invoice_id', 'in', invoiceIds)
    .orderBy('credit_note.number_year')
    .orderBy('credit_note.number_seq')
    .execute();
  const lines = notes.length
    ? await db
        .selectFrom('credit_note_line')
        .selectAll()
        .where(
          'credit_note_id',
          'in',
          notes.map((n) => n.id),
        )
        .orderBy('position')
        .execute()
    : [];
  return notes.map((n) => ({
    id: n.id,
    number: n.number,
    invoiceId: n.invoice_id,
    invoiceNumber: n.invoice_number,
    kind: n.kind,
    reason: n.reason,
    issuedOn: n.issued_on,
    currency: n.currency.trim(),
    subtotalCents: n.subtotal_cents,
    taxCents: n.tax_cents,
    totalCents: n.total_cents,
    lines: lines
      .filter((l) => l.credit_note_id === n.id)
      .map((l) => ({ id: l.id, description: l.description, amountCents: l.amount_cents, taxRateBp: l.tax_rate_bp, taxCents: l.tax_cents })),
  }));
}

export async function getDetail(db: Database, id: string, today: string): Promise<InvoiceDetail> {
  const row = await findInvoiceRow(db, id);
  if (!row) throw notFound('Invoice');
  const [lines, payments, creditNotes] = await Promise.all([
    db.selectFrom('invoice_line').selectAll().where('invoice_id', '=', id).orderBy('position').execute(),
    db.selectFrom('payment').selectAll().where('invoice_id', '=', id).orderBy('received_on').orderBy('created_at').execute(),
    creditNotesOf(db, [id]),
  ]);
  return {
    ...toSummary(row, today),
    voidReason: row.void_reason,
    runId: row.run_id,
    lines: lines.map((l) => ({
      id: l.id,
      position: l.position,
      item: l.item,
      description: l.description,
      sourceType: l.source_type,
      sourceId: l.source_id,
      sourceLabel: l.source_label,
      serviceFrom: l.service_from,
      serviceTo: l.service_to,
      quantity: l.quantity,
      unit: l.unit,
      unitPriceCents: l.unit_price_cents,
      amountCents: l.amount_cents,
      taxRateBp: l.tax_rate_bp,
      taxCents: l.tax_cents,
    })),
    payments: payments.map(toPayment),
    creditNotes,
  };
}

/** Locks an invoice row for the rest of the transaction. */
export async function lockInvoice(trx: Database, id: string) {
  if (!isUuid(id)) throw notFound('Invoice');
  const row = await trx.selectFrom('invoice').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
  if (!row) throw notFound('Invoice');
  return row;
}

async function recomputeTotals(trx: Database, invoiceId: string) {
  await sql`update invoice set
      subtotal_cents = t.subtotal, tax_cents = t.tax, total_cents = t.subtotal + t.tax, updated_at = now()
    from (select coalesce(sum(amount_cents), 0)::int as subtotal, coalesce(sum(tax_cents), 0)::int as tax
          from invoice_line where invoice_id = ${invoiceId}) t
    where invoice.id = ${invoiceId}`.execute(trx);
}

/** Moves an issued invoice to paid when nothing is left to pay, and back when a correction reopens it. */
async function settle(trx: Database, invoiceId: string) {
  await sql`update invoice set
      status = case when status = 'issued' and total_cents - paid_cents - credited_cents <= 0 then 'paid'
                    when status = 'paid' and total_cents - paid_cents - credited_cents > 0 then 'issued'
                    else status end,
      paid_at = case when status = 'issued' and total_cents - paid_cents - credited_cents <= 0 then now()
                     when status = 'paid' and total_cents - paid_cents - credited_cents > 0 then null
                     else paid_at end,
      updated_at = now()
    where id = ${invoiceId}`.execute(trx);
}

/**
 * Makes the member's invoice for the period from its priced charges, unless one exists already:
 * the unique (member, period) constraint decides, so a concurrent run waits here and then makes none.
 * Returns the new invoice's id, or null when the member already has one for the period.
 */
export async function createInvoice(
  trx: Database,
  args: { runId: string | null; memberId: string; period: string; currency: string; lines: PricedCharge[] },
): Promise<string | null> {
  const created = await trx
    .insertInto('invoice')
    .values({ run_id: args.runId, member_id: args.memberId, period: args.period, currency: args.currency })
    .onConflict((oc) => oc.columns(['member_id', 'period']).doNothing())
    .returning('id')
    .executeTakeFirst();
  if (!created) return null;
  await insertLines(trx, created.id, args.lines, 1);
  await recomputeTotals(trx, created.id);
  return created.id;
}

async function insertLines(trx: Database, invoiceId: string, lines: PricedCharge[], firstPosition: number) {
  if (lines.length === 0) return;
  const inserted = await trx
    .insertInto('invoice_line')
    .values(
      lines.map((l, i) => ({
        invoice_id: invoiceId,
        position: firstPosition + i,
        item: l.item,
        description: l.description,
        source_type: l.sourceType,
        source_id: l.sourceId,
        source_label: l.sourceLabel,
        service_from: l.serviceFrom,
        service_to: l.serviceTo,
        quantity: l.quantity,
        unit: l.unit,
        unit_price_cents: l.unitPriceCents,
        amount_cents: l.amountCents,
        tax_rate_bp: l.taxRateBp,
        tax_cents: l.taxCents,
        price_id: l.priceId,
      })),
    )
    .returning(['id', 'source_type', 'source_id'])
    .execute();
  for (const line of inserted) {
    if (line.source_type === 'manual_charge') {
      await trx.updateTable('manual_charge').set({ invoice_line_id: line.id }).where('id', '=', line.source_id).execute();
    }
  }
}

/** Adds a manual charge to a member's draft invoice (the run has already made it). */
export async function appendToDraft(trx: Database, invoiceId: string, line: PricedCharge) {
  const max = await trx
    .selectFrom('invoice_line')
    .select((eb) => eb.fn.max('position').as('max'))
    .where('invoice_id', '=', invoiceId)
    .executeTakeFirst();
  await insertLines(trx, invoiceId, [line], Number(max?.max ?? 0) + 1);
  await recomputeTotals(trx, invoiceId);
}

/** Issues a draft: takes the next gapless number of the issue year, dates it and sets the due date. */
export async function issueInvoice(trx: Database, invoiceId: string, today: string, actorId: string | null): Promise<void> {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status !== 'draft') throw conflict(`This invoice is ${inv.status}, not a draft.`);
  const profile = await getBillingProfile(trx);
  const { number, seq, year } = await takeNumber(trx, 'invoice', Number(today.slice(0, 4)));
  await trx
    .updateTable('invoice')
    .set({
      status: 'issued',
      number,
      number_year: year,
      number_seq: seq,
      issued_on: today,
      due_on: addDays(today, profile.paymentTermsDays),
      updated_at: new Date(),
    })
    .where('id', '=', invoiceId)
    .execute();
  await settle(trx, invoiceId);
  await audit(trx, actorId, 'issued', 'Invoice', invoiceId, { number });
}

export async function recordPayment(
  trx: Database,
  invoiceId: string,
  p: {
    amountCents: number;
    method: PaymentMethod;
    receivedOn: string;
    reference?: string;
    note?: string;
    checkoutSessionId?: string | null;
    creditNoteId?: string | null;
    /** Of amountCents, what is beyond what the invoice owes: kept on the payment, not counted as paid. */
    overpaidCents?: number;
  },
  actorId: string | null,
): Promise<Payment> {
  const inv = await lockInvoice(trx, invoiceId);
  const row = await trx
    .insertInto('payment')
    .values({
      invoice_id: invoiceId,
      member_id: inv.member_id,
      method: p.method,
      amount_cents: p.amountCents,
      currency: inv.currency,
      received_on: p.receivedOn,
      reference: p.reference ?? '',
      note: p.note ?? '',
      checkout_session_id: p.checkoutSessionId ?? null,
      credit_note_id: p.creditNoteId ?? null,
      recorded_by: actorId,
      overpaid_cents: p.overpaidCents ?? 0,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
  await trx
    .updateTable('invoice')
    .set({ paid_cents: sql`paid_cents + ${p.amountCents - (p.overpaidCents ?? 0)}`, updated_at: new Date() })
    .where('id', '=', invoiceId)
    .execute();
  await settle(trx, invoiceId);
  await audit(trx, actorId, p.amountCents < 0 ? 'refunded' : 'payment_recorded', 'Invoice', invoiceId, {
    paymentId: row.id,
    amountCents: p.amountCents,
    method: p.method,
  });
  return toPayment(row);
}

/** A bank transfer or cash received by the treasurer: whole or part, never more than is due. */
export async function recordManualPayment(
  trx: Database,
  invoiceId: string,
  p: { amountCents: number; method: 'bank_transfer' | 'cash'; receivedOn: string; reference: string; note: string },
  actorId: string,
): Promise<Payment> {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status !== 'issued') throw conflict(`Only an issued invoice takes payments; this one is ${inv.status}.`);
  const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
  if (p.amountCents > due) {
    throw unprocessable(`Only ${due} cents are due on this invoice.`, [{ path: 'amountCents', message: `At most ${due} cents are due` }]);
  }
  return recordPayment(trx, invoiceId, p, actorId);
}

async function issueCreditNote(
  trx: Database,
  inv: { id: string; member_id: string; currency: string },
  args: {
    kind: 'void' | 'refund';
    reason: string;
    today: string;
    lines: { invoiceLineId: string | null; description: string; amountCents: number; taxRateBp: number; taxCents: number }[];
  },
  actorId: string,
): Promise<string> {
  const subtotal = args.lines.reduce((s, l) => s + l.amountCents, 0);
  const tax = args.lines.reduce((s, l) => s + l.taxCents, 0);
  const { number, seq, year } = await takeNumber(trx, 'credit_note', Number(args.today.slice(0, 4)));
  const note = await trx
    .insertInto('credit_note')
    .values({
      number,
      number_year: year,
      number_seq: seq,
      invoice_id: inv.id,
      member_id: inv.member_id,
      kind: args.kind,
      reason: args.reason,
      issued_on: args.today,
      currency: inv.currency,
      subtotal_cents: subtotal,
      tax_cents: tax,
      total_cents: subtotal + tax,
      created_by: actorId,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await trx
    .insertInto('credit_note_line')
    .values(
      args.lines.map((l, i) => ({
        credit_note_id: note.id,
        position: i + 1,
        invoice_line_id: l.invoiceLineId,
        description: l.description,
        amount_cents: l.amountCents,
        tax_rate_bp: l.taxRateBp,
        tax_cents: l.taxCents,
      })),
    )
    .execute();
  await trx
    .updateTable('invoice')
    .set({ credited_cents: sql`credited_cents + ${subtotal + tax}`, updated_at: new Date() })
    .where('id', '=', inv.id)
    .execute();
  await audit(trx, actorId, 'credit_note_issued', 'Invoice', inv.id, { creditNote: number, kind: args.kind, totalCents: subtotal + tax });
  return note.id;
}

/**
 * Voids an invoice. It is never deleted: an issued one is replaced by a credit note for whatever
 * earlier credit notes have not already credited, line by line. A draft (never sent, no number)
 * needs no credit note. Money already paid is paid back when a refund method is given, otherwise
 * it stays as credit on the member's account.
 */
export async function voidInvoice(trx: Database, invoiceId: string, input: Required<VoidInvoiceInput>, today: string, actorId: string) {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status === 'void') throw conflict('This invoice is already void.');
  let creditNoteId: string | null = null;
  if (inv.status !== 'draft') {
    const remaining = inv.total_cents - inv.credited_cents;
    if (remaining > 0) {
      const lines = await trx.selectFrom('invoice_line').selectAll().where('invoice_id', '=', invoiceId).orderBy('position').execute();
      const cnLines = lines.map((l): { invoiceLineId: string | null; description: string; amountCents: number; taxRateBp: number; taxCents: number } => ({
        invoiceLineId: l.id,
        description: `${l.description} — ${l.source_label}`,
        amountCents: l.amount_cents,
        taxRateBp: l.tax_rate_bp,
        taxCents: l.tax_cents,
      }));
      if (inv.credited_cents > 0) {
        const earlier = await trx
          .selectFrom('credit_note')
          .select((eb) => [eb.fn.sum<number>('subtotal_cents').as('subtotal'), eb.fn.sum<number>('tax_cents').as('tax')])
          .where('invoice_id', '=', invoiceId)
          .executeTakeFirstOrThrow();
        cnLines.push({
          invoiceLineId: null,
          description: 'Less credit notes already issued on this invoice',
          amountCents: -Number(earlier.subtotal ?? 0),
          taxRateBp: 0,
          taxCents: -Number(earlier.tax ?? 0),
        });
      }
      creditNoteId = await issueCreditNote(trx, inv, { kind: 'void', reason: input.reason, today, lines: cnLines }, actorId);
    }
  }
  await trx
    .updateTable('invoice')
    .set({ status: 'void', voided_at: new Date(), void_reason: input.reason, updated_at: new Date() })
    .where('id', '=', invoiceId)
    .execute();
  await audit(trx, actorId, 'voided', 'Invoice', invoiceId, { reason: input.reason, creditNoteId });
  if (creditNoteId && input.refundMethod && inv.paid_cents > 0) {
    await recordPayment(
      trx,
      invoiceId,
      { amountCents: -inv.paid_cents, method: input.refundMethod, receivedOn: today, note: `Refund on voiding: ${input.reason}`, creditNoteId },
      actorId,
    );
  }
  return { creditNoteId };
}

/**
 * A refund or partial credit: a credit note for an amount including tax, split into net and tax at
 * the invoice's rate (net rounded half-up, tax the rest). With a refund method the money is also
 * paid back, which needs that much to have been paid.
 */
export async function refundInvoice(trx: Database, invoiceId: string, input: Required<RefundInput>, today: string, actorId: string) {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status !== 'issued' && inv.status !== 'paid') throw conflict(`Only an issued or paid invoice can be credited; this one is ${inv.status}.`);
  const creditable = inv.total_cents - inv.credited_cents;
  if (input.amountCents > creditable) {
    throw unprocessable(`At most ${creditable} cents can still be credited.`, [{ path: 'amountCents', message: `At most ${creditable} cents` }]);
  }
  if (input.refundMethod && input.amountCents > inv.paid_cents) {
    throw unprocessable(`Only ${inv.paid_cents} cents have been paid, so no more can be paid back.`, [
      { path: 'amountCents', message: `At most ${inv.paid_cents} cents were paid` },
    ]);
  }
  const rates = await trx.selectFrom('invoice_line').select('tax_rate_bp').distinct().where('invoice_id', '=', invoiceId).execute();
  const taxedRates = [...new Set(rates.map((r) => r.tax_rate_bp))];
  if (taxedRates.length > 1) {
    throw unprocessable('This invoice has lines at several tax rates; void it and bill again instead of a partial credit.');
  }
  const rateBp = taxedRates[0] ?? 0;
  const { netCents, taxCents } = splitGross(input.amountCents, rateBp);
  const creditNoteId = await issueCreditNote(
    trx,
    inv,
    {
      kind: 'refund',
      reason: input.reason,
      today,
      lines: [{ invoiceLineId: null, description: `Credit: ${input.reason}`, amountCents: netCents, taxRateBp: rateBp, taxCents }],
    },
    actorId,
  );
  if (input.refundMethod) {
    await recordPayment(
      trx,
      invoiceId,
      { amountCents: -input.amountCents, method: input.refundMethod, receivedOn: today, note: `Refund: ${input.reason}`, creditNoteId },
      actorId,
    );
  }
  await settle(trx, invoiceId);
  return { creditNoteId };
}

export async function markSent(trx: Database, invoiceId: string, actorId: string, to: string) {
  await trx.updateTable('invoice').set({ sent_at: new Date(), updated_at: new Date() }).where('id', '=', invoiceId).execute();
  await audit(trx, actorId, 'sent', 'Invoice', invoiceId, { to });
}

/** What a member owes over every invoice ever issued to them (negative: the co-op owes them). */
export async function memberBalance(db: Database, memberId: string, today: string, currency: string): Promise<MemberBalance> {
  const owed: Expression<SqlBool> = sql<SqlBool>`invoice.status in ('issued','paid','void') and invoice.issued_on is not null`;
  const row = await db
    .selectFrom('invoice')
    .select([
      sql<number>`coalesce(sum(${dueExpr}), 0)::int`.as('balance'),
      sql<number>`count(*) filter (where invoice.status = 'issued' and ${dueExpr} > 0)::int`.as('open'),
      sql<number>`count(*) filter (where invoice.status = 'issued' and ${dueExpr} > 0 and invoice.due_on < ${today}::date)::int`.as('overdue'),
    ])
    .where('member_id', '=', memberId)
    .where(owed)
    .executeTakeFirstOrThrow();
  // Money paid online beyond what was due is owed back until the treasurer has refunded it.
  const overpaid = await db
    .selectFrom('payment')
    .select(sql<number>`coalesce(sum(overpaid_cents), 0)::int`.as('total'))
    .where('member_id', '=', memberId)
    .where('overpaid_cents', '>', 0)
    .where('overpayment_refunded_on', 'is', null)
    .executeTakeFirstOrThrow();
  return { currency, balanceCents: row.balance - overpaid.total, openInvoices: row.open, overdueInvoices: row.overdue };
}
