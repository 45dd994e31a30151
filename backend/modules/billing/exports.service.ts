import { paymentMethodLabels } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import type { ExportCell } from '../../lib/export-cells.ts';
import { csvFile, csvValue, xlsxFile, type Table } from '../../lib/tabular-export.ts';

/**
 * A period's ledger: the lines of its issued invoices, and the credit notes and payments on those
 * invoices whenever they came. Each credit note and payment belongs to one invoice of one period,
 * so a month-by-month export lists each exactly once.
 */
export async function periodLedger(db: Database, period: string) {
  const lines = await db
    .selectFrom('invoice_line as l')
    .innerJoin('invoice as i', 'i.id', 'l.invoice_id')
    .innerJoin('app_user as u', 'u.id', 'i.member_id')
    .select([
      'i.number',
      'i.status',
      'i.issued_on',
      'i.due_on',
      'i.currency',
      'u.name as member',
      'u.email',
      'l.position',
      'l.description',
      'l.source_type',
      'l.source_id',
      'l.source_label',
      'l.service_from',
      'l.service_to',
      'l.quantity',
      'l.unit',
      'l.unit_price_cents',
      'l.amount_cents',
      'l.tax_rate_bp',
      'l.tax_cents',
    ])
    .where('i.period', '=', period)
    .where('i.status', '<>', 'draft')
    .orderBy('i.number_year')
    .orderBy('i.number_seq')
    .orderBy('l.position')
    .execute();
  const credits = await db
    .selectFrom('credit_note as c')
    .innerJoin('invoice as i', 'i.id', 'c.invoice_id')
    .innerJoin('app_user as u', 'u.id', 'c.member_id')
    .select([
      'c.number',
      'c.issued_on',
      'c.kind',
      'c.reason',
      'c.currency',
      'c.subtotal_cents',
      'c.tax_cents',
      'c.total_cents',
      'i.number as invoice_number',
      'u.name as member',
    ])
    .where('i.period', '=', period)
    .orderBy('c.number_year')
    .orderBy('c.number_seq')
    .execute();
  const payments = await db
    .selectFrom('payment as p')
    .innerJoin('invoice as i', 'i.id', 'p.invoice_id')
    .innerJoin('app_user as u', 'u.id', 'p.member_id')
    .select(['p.received_on', 'p.method', 'p.amount_cents', 'p.currency', 'p.reference', 'p.note', 'i.number as invoice_number', 'u.name as member'])
    .where('i.period', '=', period)
    .orderBy('p.received_on')
    .orderBy('p.created_at')
    .execute();

  type Line = (typeof lines)[number];
  type Credit = (typeof credits)[number];
  type Payment = (typeof payments)[number];
  const currency = (r: { currency: string }) => r.currency.trim();
  const invoiceLines: Table<Line> = {
    name: 'Invoice lines',
    currency,
    columns: [
      { header: 'Invoice', value: (l) => l.number },
      { header: 'Status', value: (l) => l.status },
      { header: 'Invoice date', value: (l) => l.issued_on, type: 'date' },
      { header: 'Due date', value: (l) => l.due_on, type: 'date' },
      { header: 'Member', value: (l) => l.member },
      { header: 'E-mail', value: (l) => l.email },
      { header: 'Line', value: (l) => l.position },
      { header: 'Description', value: (l) => l.description },
      { header: 'Source', value: (l) => l.source_label },
      { header: 'Source record', value: (l) => `${l.source_type}:${l.source_id}` },
      { header: 'From', value: (l) => l.service_from, type: 'date' },
      { header: 'To', value: (l) => l.service_to, type: 'date' },
      { header: 'Quantity', value: (l) => l.quantity },
      { header: 'Unit', value: (l) => l.unit },
      { header: 'Unit price', value: (l) => l.unit_price_cents, type: 'money' },
      { header: 'Net', value: (l) => l.amount_cents, type: 'money' },
      { header: 'Tax rate %', value: (l) => l.tax_rate_bp / 100 },
      { header: 'Tax', value: (l) => l.tax_cents, type: 'money' },
      { header: 'Gross', value: (l) => l.amount_cents + l.tax_cents, type: 'money' },
      { header: 'Currency', value: currency },
    ],
    rows: lines,
  };
  const creditNotes: Table<Credit> = {
    name: 'Credit notes',
    currency,
    columns: [
      { header: 'Credit note', value: (c) => c.number },
      { header: 'Date', value: (c) => c.issued_on, type: 'date' },
      { header: 'Invoice', value: (c) => c.invoice_number },
      { header: 'Member', value: (c) => c.member },
      { header: 'Kind', value: (c) => (c.kind === 'void' ? 'Replaces a voided invoice' : 'Refund or credit') },
      { header: 'Reason', value: (c) => c.reason },
      { header: 'Net', value: (c) => c.subtotal_cents, type: 'money' },
      { header: 'Tax', value: (c) => c.tax_cents, type: 'money' },
      { header: 'Gross', value: (c) => c.total_cents, type: 'money' },
      { header: 'Currency', value: currency },
    ],
    rows: credits,
  };
  const paymentRows: Table<Payment> = {
    name: 'Payments',
    currency,
    columns: [
      { header: 'Received', value: (p) => p.received_on, type: 'date' },
      { header: 'Invoice', value: (p) => p.invoice_number },
      { header: 'Member', value: (p) => p.member },
      { header: 'Method', value: (p) => paymentMethodLabels[p.method] },
      { header: 'Reference', value: (p) => p.reference },
      { header: 'Note', value: (p) => p.note },
      { header: 'Amount', value: (p) => p.amount_cents, type: 'money' },
      { header: 'Currency', value: currency },
    ],
    rows: payments,
  };
  return [invoiceLines, creditNotes, paymentRows] as const;
}

/** The period's ledger: its invoice lines, credit notes and payments, one table each. */
export type Ledger = Awaited<ReturnType<typeof periodLedger>>;

/**
 * One CSV: a `Record` column says which table each row belongs to (invoice line, credit note,
 * payment), so the accountant's import can split it. Amounts are decimals in the currency.
 */
export function ledgerCsv(sheets: Ledger): string {
  const tables = sheets as unknown as Table<unknown>[];
  const headers = ['Record', ...new Set(tables.flatMap((s) => s.columns.map((c) => c.header)))];
  const data: ExportCell[][] = [headers];
  for (const s of tables) {
    const record = s.name.replace(/s$/, '').toLowerCase();
    for (const row of s.rows) {
      const out: Record<string, ExportCell> = { Record: record };
      for (const c of s.columns) out[c.header] = csvValue(c, row);
      data.push(headers.map((h) => out[h] ?? ''));
    }
  }
  return csvFile(data);
}

export function ledgerXlsx(sheets: Ledger, title: string): Promise<Buffer> {
  return xlsxFile(sheets, title);
}
