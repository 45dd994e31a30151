import { z } from 'zod';
import { isValidDate, periodPattern } from '../billing/dates.ts';
import { searchTextSchema, sortableListQuerySchema } from './pagination.ts';

/** What the price list prices. Every charge line is one of these, or a manual charge or credit. */
export const priceItems = [
  'fermenter_day',
  'keg_week',
  'tap_week',
  'co2_fill',
  'co2_kg',
  'cleaning',
  'finings_dose',
  'membership_month',
  'late_keg_day',
] as const;
export type PriceItem = (typeof priceItems)[number];
export const lineItems = [...priceItems, 'manual'] as const;
export type LineItem = (typeof lineItems)[number];

export const priceItemInfo: Record<PriceItem, { label: string; unit: string; help: string }> = {
  fermenter_day: { label: 'Fermenter-day', unit: 'day', help: 'Per day a fermenter is booked, by capacity band' },
  keg_week: { label: 'Keg-week', unit: 'week', help: 'Per week or part week a keg is out with a member' },
  tap_week: { label: 'Tap-position-week', unit: 'week', help: 'Per week or part week a tap position is booked' },
  co2_fill: { label: 'CO2 per fill', unit: 'fill', help: 'Per keg purged and filled with CO2 at a transfer' },
  co2_kg: { label: 'CO2 per kg', unit: 'kg', help: 'Per kilogram of CO2 used, where it is weighed' },
  cleaning: { label: 'Cleaning fee', unit: 'vessel', help: 'Per vessel cleaned and sanitized after use' },
  finings_dose: { label: 'Finings', unit: 'dose', help: 'Per dose of finings added at a transfer' },
  membership_month: { label: 'Membership dues', unit: 'month', help: 'Per member per month' },
  late_keg_day: { label: 'Late keg return', unit: 'day', help: 'Per day a keg is kept past its due date' },
};

export const invoiceStatuses = ['draft', 'issued', 'paid', 'void'] as const;
export type InvoiceStatus = (typeof invoiceStatuses)[number];
export const invoiceStatusLabels: Record<InvoiceStatus, string> = { draft: 'Draft', issued: 'Issued', paid: 'Paid', void: 'Void' };

export const paymentMethods = ['online', 'bank_transfer', 'cash'] as const;
export type PaymentMethod = (typeof paymentMethods)[number];
export const manualPaymentMethods = ['bank_transfer', 'cash'] as const;
export const paymentMethodLabels: Record<PaymentMethod, string> = { online: 'Online', bank_transfer: 'Bank transfer', cash: 'Cash' };

export const periodSchema = z.string().trim().regex(periodPattern, 'Use a month like 2026-11');
export const dateSchema = z
  .string()
  .trim()
  .refine((d) => isValidDate(d), 'Use a date like 2026-11-30');
const cents = z.number().int('Whole cents');
const text = (max: number, what: string) => z.string().trim().min(1, `Enter ${what}`).max(max, `Keep it under ${max} characters`);

/** Body of `POST /api/invoice-runs`. `issue: false` leaves the invoices as drafts to review. */
export const invoiceRunInputSchema = z.object({ period: periodSchema, issue: z.boolean().default(true) });
export type InvoiceRunInput = z.input<typeof invoiceRunInputSchema>;

/** `GET /api/invoice-runs/preview?period=`. */
export const invoiceRunPreviewQuerySchema = z.object({ period: periodSchema });

export const invoiceSortFields = ['createdAt', 'number', 'issuedOn', 'dueOn', 'period', 'member', 'total', 'amountDue', 'status'] as const;
/** `GET /api/invoices?period&status&memberId&q&page&pageSize&sort&order`. */
export const invoiceListQuerySchema = sortableListQuerySchema(invoiceSortFields, 'createdAt').extend({
  period: periodSchema.optional(),
  status: z.enum(invoiceStatuses).optional(),
  memberId: z.uuid('Not a member id').optional(),
  q: searchTextSchema,
  /** Only invoices with something still to pay. */
  unpaid: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
});
export type InvoiceListQuery = z.infer<typeof invoiceListQuerySchema>;
export type InvoiceListQueryInput = z.input<typeof invoiceListQuerySchema>;

/** Body of `POST /api/prices`: a new price from a date on (never back-dated). */
export const priceInputSchema = z
  .object({
    item: z.enum(priceItems),
    bandMaxLiters: z.number().int('Whole litres').min(1, 'At least 1 L').max(100_000).nullable().default(null),
    unitCents: cents.min(0, 'A price is not negative').max(10_000_000, 'That price is too high'),
    effectiveFrom: dateSchema,
    note: z.string().trim().max(200).default(''),
  })
  .refine((p) => (p.item === 'fermenter_day') === (p.bandMaxLiters !== null), {
    path: ['bandMaxLiters'],
    message: 'Fermenter-days need a capacity band; other items have none',
  });
export type PriceInput = z.input<typeof priceInputSchema>;

/** Body of `POST /api/tax-rates`. */
export const taxRateInputSchema = z.object({
  rateBp: z.number().int('Whole basis points (8 % is 800)').min(0, 'Zero or more').max(10_000, 'At most 100 %'),
  label: text(40, 'a label, e.g. VAT'),
  effectiveFrom: dateSchema,
});
export type TaxRateInput = z.input<typeof taxRateInputSchema>;

/** The invoice header and how members pay: `GET/PUT /api/billing/profile`. */
export const billingProfileSchema = z.object({
  coopName: text(120, 'the co-op’s name'),
  addressLines: z.array(text(120, 'an address line')).min(1, 'Enter the address').max(5, 'At most five lines'),
  email: z.email('Enter an e-mail address'),
  currency: z
    .string()
    .trim()
    .toUpperCase()
    .regex(/^[A-Z]{3}$/, 'A three-letter currency code, like EUR'),
  paymentTermsDays: z.number().int().min(0, 'Zero or more days').max(120, 'At most 120 days'),
  bankAccountName: text(120, 'the account holder'),
  bankAccount: text(60, 'the account number'),
  paymentNote: z.string().trim().max(500).default(''),
});
export type BillingProfile = z.infer<typeof billingProfileSchema>;

export const defaultBillingProfile: BillingProfile = {
  coopName: 'Larkspur Yard Brewing Co-op',
  addressLines: ['Unit 4, Larkspur Yard', '17 Maltings Lane', 'Hopwell HW3 2KY'],
  email: 'treasurer@example.org',
  currency: 'EUR',
  paymentTermsDays: 14,
  bankAccountName: 'Larkspur Yard Brewing Co-op',
  bankAccount: 'XX00 LARK 0000 1234 5678 90',
  paymentNote: 'Pay online from Billing → My invoices, or by bank transfer quoting the invoice number.',
};

/** Body of `POST /api/manual-charges`: a charge (positive) or credit (negative) with a reason. */
export const manualChargeInputSchema = z.object({
  memberId: z.uuid('Pick a member'),
  period: periodSchema,
  description: text(160, 'what the invoice should say'),
  reason: text(500, 'the reason'),
  amountCents: cents.refine((v) => v !== 0, 'Not zero').refine((v) => Math.abs(v) <= 10_000_000, 'That amount is too large'),
  taxable: z.boolean().default(true),
});
export type ManualChargeInput = z.input<typeof manualChargeInputSchema>;

/** Body of `POST /api/invoices/:id/payments`: a bank transfer or cash, whole or part. */
export const paymentInputSchema = z.object({
  amountCents: cents.min(1, 'More than zero'),
  method: z.enum(manualPaymentMethods),
  receivedOn: dateSchema,
  reference: z.string().trim().max(120).default(''),
  note: z.string().trim().max(500).default(''),
});
export type PaymentInput = z.input<typeof paymentInputSchema>;

/** Body of `POST /api/invoices/:id/void`: the invoice is replaced by a credit note for all of it. */
export const voidInvoiceSchema = z.object({
  reason: text(500, 'the reason'),
  /** Pay back what was already paid, this way (otherwise it stays as credit on the member's account). */
  refundMethod: z.enum(manualPaymentMethods).nullable().default(null),
});
export type VoidInvoiceInput = z.input<typeof voidInvoiceSchema>;

/** Body of `POST /api/invoices/:id/refunds`: a credit note for part of an invoice, tax included. */
export const refundInputSchema = z.object({
  amountCents: cents.min(1, 'More than zero'),
  reason: text(500, 'the reason'),
  refundMethod: z.enum(manualPaymentMethods).nullable().default(null),
});
export type RefundInput = z.input<typeof refundInputSchema>;

export const exportFormats = ['csv', 'xlsx'] as const;
/** `GET /api/invoices/export?period=&format=csv|xlsx`. */
export const invoiceExportQuerySchema = z.object({ period: periodSchema, format: z.enum(exportFormats).default('csv') });

/** `GET /api/billing/ageing?asOf=`. */
export const ageingQuerySchema = z.object({ asOf: dateSchema.optional() });

export const ageingBuckets = ['0-30', '31-60', '61-90', '90+'] as const;
export type AgeingBucket = (typeof ageingBuckets)[number];
export const ageingBucketLabels: Record<AgeingBucket, string> = { '0-30': '0–30 days', '31-60': '31–60 days', '61-90': '61–90 days', '90+': 'Over 90 days' };

// ---- What the API returns ----

export interface InvoiceSummary {
  id: string;
  number: string | null;
  period: string;
  status: InvoiceStatus;
  memberId: string;
  memberName: string;
  memberEmail: string;
  currency: string;
  issuedOn: string | null;
  dueOn: string | null;
  subtotalCents: number;
  taxCents: number;
  totalCents: number;
  paidCents: number;
  creditedCents: number;
  amountDueCents: number;
  overdue: boolean;
  sentAt: string | null;
  paidAt: string | null;
  voidedAt: string | null;
  createdAt: string;
  /** When the member was last reminded of it (overdue reminders), if ever. */
  lastRemindedAt: string | null;
}

/** A charge as one line of a bill: what a run's preview shows, and (with its id and place) an invoice line. */
export interface ChargePreviewLine {
  item: LineItem;
  description: string;
  /** The record it comes from ('booking', 'membership', 'manual_charge', …) and its id. */
  sourceType: string;
  sourceId: string;
  /** How the invoice names the source: "F-07, 12–26 Nov, 14 days". */
  sourceLabel: string;
  /** First and last day of use covered (inclusive). */
  serviceFrom: string;
  serviceTo: string;
  quantity: number;
  unit: string;
  unitPriceCents: number;
  amountCents: number;
  taxRateBp: number;
  taxCents: number;
}

export interface InvoiceLine extends ChargePreviewLine {
  id: string;
  position: number;
}

export interface Payment {
  id: string;
  invoiceId: string;
  method: PaymentMethod;
  amountCents: number;
  currency: string;
  receivedOn: string;
  reference: string;
  note: string;
  creditNoteId: string | null;
  createdAt: string;
  /** Of amountCents, what came in beyond what the invoice owed: not counted as paid, owed back to the member. */
  overpaidCents: number;
  /** When the treasurer paid that excess back (null while it is still owed). */
  overpaymentRefundedOn: string | null;
}

export interface CreditNoteLine {
  id: string;
  description: string;
  amountCents: number;
  taxRateBp: number;
  taxCents: number;
}

export interface CreditNote {
  id: string;
  number: string;
  invoiceId: string;
  invoiceNumber: string | null;
  kind: 'void' | 'refund';
  reason: string;
  issuedOn: string;
  currency: string;
  subtotalCents: number;
  taxCents: number;
  totalCents: number;
  lines: CreditNoteLine[];
}

export interface InvoiceDetail extends InvoiceSummary {
  voidReason: string | null;
  runId: string | null;
  lines: InvoiceLine[];
  payments: Payment[];
  creditNotes: CreditNote[];
}

export interface InvoicePreview {
  memberId: string;
  memberName: string;
  alreadyInvoiced: boolean;
  lines: ChargePreviewLine[];
  subtotalCents: number;
  taxCents: number;
  totalCents: number;
}

export interface RunPreview {
  period: string;
  currency: string;
  canRun: boolean;
  /** Why the period cannot be run yet (not over, prices missing). */
  problems: string[];
  /** Which kinds of record were read for charges. */
  sources: string[];
  invoices: InvoicePreview[];
  totalCents: number;
}

export interface InvoiceRun {
  id: string;
  period: string;
  issued: boolean;
  invoiceCount: number;
  totalCents: number;
  runBy: { id: string; name: string } | null;
  createdAt: string;
}

export interface Price {
  id: string;
  item: PriceItem;
  bandMaxLiters: number | null;
  unitCents: number;
  effectiveFrom: string;
  note: string;
  /** In effect today (the latest row for its item and band whose date has come). */
  current: boolean;
  createdAt: string;
}

export interface TaxRate {
  id: string;
  rateBp: number;
  label: string;
  effectiveFrom: string;
  current: boolean;
}

export interface ManualCharge {
  id: string;
  memberId: string;
  memberName: string;
  period: string;
  description: string;
  reason: string;
  amountCents: number;
  taxable: boolean;
  invoiceId: string | null;
  createdAt: string;
}

export interface AgeingRow {
  memberId: string;
  memberName: string;
  buckets: Record<AgeingBucket, number>;
  totalCents: number;
}

export interface AgeingReport {
  asOf: string;
  currency: string;
  /** Open amounts by how long ago the invoice was issued. */
  totals: Record<AgeingBucket, number>;
  totalCents: number;
  rows: AgeingRow[];
}

export interface BillingSummary {
  currency: string;
  today: string;
  unpaid: { count: number; totalCents: number };
  overdue: { count: number; totalCents: number };
  drafts: number;
  ageing: Record<AgeingBucket, number>;
  /** Online payments that brought more than was due: the excess, still to be paid back to the members. */
  overpayments: { count: number; totalCents: number };
  lastRun: InvoiceRun | null;
  /** The most recent period that has ended and has no run yet, if any. */
  suggestedPeriod: string;
}

/** Money paid online beyond what its invoice owed (a second checkout paid, or a race): owed back to the member. */
export interface Overpayment {
  paymentId: string;
  invoiceId: string;
  invoiceNumber: string | null;
  memberId: string;
  memberName: string;
  currency: string;
  receivedOn: string;
  /** The whole payment, and the part of it that was not due. */
  amountCents: number;
  overpaidCents: number;
  reference: string;
  refundedOn: string | null;
  refundReference: string | null;
}

/** Body of `POST /api/billing/overpayments/:paymentId/refunded`: the treasurer paid the excess back. */
export const overpaymentRefundSchema = z.object({
  refundedOn: dateSchema,
  reference: z.string().trim().max(120).default(''),
});
export type OverpaymentRefundInput = z.input<typeof overpaymentRefundSchema>;

export interface MemberBalance {
  currency: string;
  /** What the member owes (positive) or is owed (negative), over every issued invoice. */
  balanceCents: number;
  openInvoices: number;
  overdueInvoices: number;
}
