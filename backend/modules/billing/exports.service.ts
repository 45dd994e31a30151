import { paymentMethodLabels } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { ledgerCreditNotes, ledgerLines, ledgerPayments } from './exports.repository.ts';
import type { ExportCell } from '../../lib/export-cells.ts';
import { csvFile, csvValue, xlsxFile, type Table } from '../../lib/tabular-export.ts';

/**
 * A period's ledger: the lines of its issued invoices, and the credit notes and payments on those
 * invoices whenever they came. Each credit note and payment belongs to one invoice of one period,
 * so a month-by-month export lists each exactly once.
 */
export async function periodLedger(db: Database, period: string) {
  const [lines, credits, payments] = await Promise.all([ledgerLines(db, period), ledgerCreditNotes(db, period), ledgerPayments(db, period)]);
  const invoiceLines = ledgerTable('Invoice lines', lines, [
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
  ]);
  const creditNotes = ledgerTable('Credit notes', credits, [
    { header: 'Credit note', value: (c) => c.number },
    { header: 'Date', value: (c) => c.issued_on, type: 'date' },
    { header: 'Invoice', value: (c) => c.invoice_number },
    { header: 'Member', value: (c) => c.member },
    { header: 'Kind', value: (c) => (c.kind === 'void' ? 'Replaces a voided invoice' : 'Refund or credit') },
    { header: 'Reason', value: (c) => c.reason },
    { header: 'Net', value: (c) => c.subtotal_cents, type: 'money' },
    { header: 'Tax', value: (c) => c.tax_cents, type: 'money' },
    { header: 'Gross', value: (c) => c.total_cents, type: 'money' },
  ]);
  const paymentRows = ledgerTable('Payments', payments, [
    { header: 'Received', value: (p) => p.received_on, type: 'date' },
    { header: 'Invoice', value: (p) => p.invoice_number },
    { header: 'Member', value: (p) => p.member },
    { header: 'Method', value: (p) => paymentMethodLabels[p.method] },
    { header: 'Reference', value: (p) => p.reference },
    { header: 'Note', value: (p) => p.note },
    { header: 'Amount', value: (p) => p.amount_cents, type: 'money' },
  ]);
  return [invoiceLines, creditNotes, paymentRows] as const;
}

const currency = (r: { currency: string }) => r.currency.trim();

/** One table of the ledger: its rows in their own currency, which every table gives last. */
function ledgerTable<R extends { currency: string }>(name: string, rows: R[], columns: Table<R>['columns']): Table<R> {
  return { name, currency, columns: [...columns, { header: 'Currency', value: currency }], rows };
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
