import type { CreditNote, InvoiceDetail, InvoiceListQuery, InvoiceSummary, MemberBalance, Payment, PaymentMethod } from '../../../shared/schemas/billing.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { notFound } from '../../lib/http-problem.ts';
import { containsPattern, orderByAllowed, paginate } from '../../lib/paginate.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { coopToday } from './billing-profile.service.ts';
import {
  creditNoteLines,
  creditNotesOfInvoices,
  findSummaryRow,
  invoiceBase,
  invoiceLines,
  invoicePayments,
  memberDues,
  openOverpayments,
  stillDue,
  withSummary,
  type SummaryRow,
} from './invoice-queries.repository.ts';

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
  if (q.unpaid) base = base.where('invoice.status', '=', 'issued').where(stillDue);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) => eb.or([eb('invoice.number', 'ilike', like), eb('app_user.name', 'ilike', like), eb('app_user.email', 'ilike', like)]));
  }
  const { rows, total } = await paginate(base, (qb) => orderByAllowed(withSummary(qb), sortColumns, q, 'invoice.id'), q);
  return { items: rows.map((r) => toSummary(r, today)), total, page: q.page, pageSize: q.pageSize };
}

export async function findInvoiceRow(db: Database, id: string) {
  if (!isUuid(id)) return undefined;
  return findSummaryRow(db, id);
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
  const notes = await creditNotesOfInvoices(db, invoiceIds);
  const lines = notes.length
    ? await creditNoteLines(
        db,
        notes.map((n) => n.id),
      )
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
  const [lines, payments, creditNotes] = await Promise.all([invoiceLines(db, id), invoicePayments(db, id), creditNotesOf(db, [id])]);
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
  const [row, overpaid] = await Promise.all([memberDues(db, memberId, today), openOverpayments(db, memberId)]);
  // Money paid online beyond what was due is owed back until the treasurer has refunded it.
  return { currency, balanceCents: row.balance - overpaid.total, openInvoices: row.open, overdueInvoices: row.overdue };
}
