import { sql, type Expression, type SqlBool } from 'kysely';
import type { CreditNote, InvoiceDetail, InvoiceListQuery, InvoiceSummary, MemberBalance, Payment, PaymentMethod } from '../../../shared/schemas/billing.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { notFound } from '../../lib/http-problem.ts';
import { containsPattern, orderByAllowed, paginate } from '../../lib/paginate.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { coopToday } from './billing-profile.service.ts';

const dueExpr = sql<number>`(invoice.total_cents - invoice.paid_cents - invoice.credited_cents)`;

/** What a client may sort the invoice list by, and the column (or output column) each means. */
const sortColumns = {
  createdAt: 'invoice.created_at',
  number: 'invoice.number',
  issuedOn: 'invoice.issued_on',
  dueOn: 'invoice.due_on',
  period: 'invoice.period',
  member: 'app_user.name',
  total: 'invoice.total_cents',
  amountDue: 'amount_due',
  status: 'invoice.status',
} as const;

/** Invoices with their members: what every read of an invoice starts from. */
function invoiceBase(db: Database) {
  return db.selectFrom('invoice').innerJoin('app_user', 'app_user.id', 'invoice.member_id');
}

function withSummary(qb: ReturnType<typeof invoiceBase>) {
  return qb.select([
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
    dueExpr.as('amount_due'),
    sql<Date | null>`(select max(r.sent_at) from reminder r where r.invoice_id = invoice.id)`.as('last_reminded_at'),
  ]);
}

type SummaryRow = Awaited<ReturnType<ReturnType<typeof withSummary>['executeTakeFirstOrThrow']>>;

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
  let base = invoiceBase(db);
  if (scope.ownerId) base = base.where('invoice.member_id', '=', scope.ownerId).where('invoice.status', '<>', 'draft');
  if (q.period) base = base.where('invoice.period', '=', q.period);
  if (q.status) base = base.where('invoice.status', '=', q.status);
  if (q.memberId) base = base.where('invoice.member_id', '=', q.memberId);
  if (q.unpaid) base = base.where('invoice.status', '=', 'issued').where(sql<SqlBool>`${dueExpr} > 0`);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) => eb.or([eb('invoice.number', 'ilike', like), eb('app_user.name', 'ilike', like), eb('app_user.email', 'ilike', like)]));
  }
  const { rows, total } = await paginate(base, (qb) => orderByAllowed(withSummary(qb), sortColumns, q, 'invoice.id'), q);
  return { items: rows.map((r) => toSummary(r, today)), total, page: q.page, pageSize: q.pageSize };
}

export async function findInvoiceRow(db: Database, id: string) {
  if (!isUuid(id)) return undefined;
  return withSummary(invoiceBase(db)).where('invoice.id', '=', id).executeTakeFirst();
}

export async function getSummary(db: Database, id: string, today: string): Promise<InvoiceSummary> {
  const row = await findInvoiceRow(db, id);
  if (!row) throw notFound('Invoice');
  return toSummary(row, today);
}

export function toPayment(p: {
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

/** An invoice in full as of the co-op's date at `now`. */
export async function detailAsOf(db: Database, id: string, now: Date): Promise<InvoiceDetail> {
  const { today } = await coopToday(db, now);
  return getDetail(db, id, today);
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
