import type { ColumnType, Generated } from 'kysely';
import type { InvoiceStatus, LineItem, PaymentMethod, PriceItem } from '../../../shared/schemas/billing.ts';
import type { Numeric, Timestamp } from './types.ts';

/** A `date` column: read back as 'YYYY-MM-DD' text (see database.ts), written as text. */
export type DateOnly = ColumnType<string, string, string>;

export interface PriceTable {
  id: Generated<string>;
  item: PriceItem;
  band_max_liters: number | null;
  unit_cents: number;
  effective_from: DateOnly;
  note: Generated<string>;
  created_by: string | null;
  created_at: Generated<Date>;
}

export interface TaxRateTable {
  id: Generated<string>;
  rate_bp: number;
  label: Generated<string>;
  effective_from: DateOnly;
  created_by: string | null;
  created_at: Generated<Date>;
}

export interface DocumentNumberCounterTable {
  series: 'invoice' | 'credit_note';
  year: number;
  last_value: number;
}

export interface InvoiceRunTable {
  id: Generated<string>;
  period: string;
  issued: boolean;
  invoice_count: Generated<number>;
  total_cents: Generated<number>;
  run_by: string | null;
  created_at: Generated<Date>;
}

export interface InvoiceTable {
  id: Generated<string>;
  run_id: string | null;
  member_id: string;
  period: string;
  status: Generated<InvoiceStatus>;
  number: string | null;
  number_year: number | null;
  number_seq: number | null;
  currency: string;
  issued_on: DateOnly | null;
  due_on: DateOnly | null;
  subtotal_cents: Generated<number>;
  tax_cents: Generated<number>;
  total_cents: Generated<number>;
  paid_cents: Generated<number>;
  credited_cents: Generated<number>;
  sent_at: Timestamp | null;
  paid_at: Timestamp | null;
  voided_at: Timestamp | null;
  void_reason: string | null;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export interface InvoiceLineTable {
  id: Generated<string>;
  invoice_id: string;
  position: number;
  item: LineItem;
  description: string;
  source_type: string;
  source_id: string;
  source_label: string;
  service_from: DateOnly;
  service_to: DateOnly;
  quantity: Numeric;
  unit: string;
  unit_price_cents: number;
  amount_cents: number;
  tax_rate_bp: number;
  tax_cents: number;
  price_id: string | null;
}

export interface ManualChargeTable {
  id: Generated<string>;
  member_id: string;
  period: string;
  description: string;
  reason: string;
  amount_cents: number;
  taxable: Generated<boolean>;
  invoice_line_id: string | null;
  created_by: string | null;
  created_at: Generated<Date>;
}

export interface CreditNoteTable {
  id: Generated<string>;
  number: string;
  number_year: number;
  number_seq: number;
  invoice_id: string;
  member_id: string;
  kind: 'void' | 'refund';
  reason: string;
  issued_on: DateOnly;
  currency: string;
  subtotal_cents: number;
  tax_cents: number;
  total_cents: number;
  created_by: string | null;
  created_at: Generated<Date>;
}

export interface CreditNoteLineTable {
  id: Generated<string>;
  credit_note_id: string;
  position: number;
  invoice_line_id: string | null;
  description: string;
  amount_cents: number;
  tax_rate_bp: number;
  tax_cents: number;
}

export interface CheckoutSessionTable {
  id: string;
  invoice_id: string;
  amount_cents: number;
  currency: string;
  url: string;
  status: Generated<'open' | 'complete' | 'expired'>;
  created_by: string | null;
  created_at: Generated<Date>;
  completed_at: Timestamp | null;
}

export interface PaymentTable {
  id: Generated<string>;
  invoice_id: string;
  member_id: string;
  method: PaymentMethod;
  amount_cents: number;
  currency: string;
  received_on: DateOnly;
  reference: Generated<string>;
  note: Generated<string>;
  checkout_session_id: string | null;
  credit_note_id: string | null;
  recorded_by: string | null;
  created_at: Generated<Date>;
  /** Of amount_cents, what came in beyond what the invoice still owed (not in its paid_cents). */
  overpaid_cents: Generated<number>;
  overpayment_refunded_on: DateOnly | null;
  overpayment_refund_reference: string | null;
  overpayment_refunded_by: string | null;
}

export interface PaymentEventTable {
  event_id: string;
  type: string;
  outcome: string;
  invoice_id: string | null;
  received_at: Generated<Date>;
}

export interface BillingTables {
  price: PriceTable;
  tax_rate: TaxRateTable;
  document_number_counter: DocumentNumberCounterTable;
  invoice_run: InvoiceRunTable;
  invoice: InvoiceTable;
  invoice_line: InvoiceLineTable;
  manual_charge: ManualChargeTable;
  credit_note: CreditNoteTable;
  credit_note_line: CreditNoteLineTable;
  checkout_session: CheckoutSessionTable;
  payment: PaymentTable;
  payment_event: PaymentEventTable;
}
