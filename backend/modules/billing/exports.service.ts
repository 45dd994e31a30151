import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { centsToDecimal } from '../../../shared/billing/money.ts';
import { paymentMethodLabels } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { neutralise, XLSX_DATE_FORMAT, xlsxDate, xlsxMoneyFormat } from '../../lib/export-cells.ts';

type Cell = string | number | null;
interface Sheet {
  name: string;
  /** `money`: cents, written as an amount in the row's `currency`; `date`: a day 'YYYY-MM-DD'. */
  columns: { header: string; key: string; money?: boolean; date?: boolean }[];
  rows: Record<string, Cell>[];
}

/**
 * A period's ledger: the lines of its issued invoices, and the credit notes and payments on those
 * invoices whenever they came. Each credit note and payment belongs to one invoice of one period,
 * so a month-by-month export lists each exactly once.
 */
export async function periodLedger(db: Database, period: string): Promise<Sheet[]> {
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

  return [
    {
      name: 'Invoice lines',
      columns: [
        { header: 'Invoice', key: 'invoice' },
        { header: 'Status', key: 'status' },
        { header: 'Invoice date', key: 'issuedOn', date: true },
        { header: 'Due date', key: 'dueOn', date: true },
        { header: 'Member', key: 'member' },
        { header: 'E-mail', key: 'email' },
        { header: 'Line', key: 'line' },
        { header: 'Description', key: 'description' },
        { header: 'Source', key: 'source' },
        { header: 'Source record', key: 'sourceRecord' },
        { header: 'From', key: 'from', date: true },
        { header: 'To', key: 'to', date: true },
        { header: 'Quantity', key: 'quantity' },
        { header: 'Unit', key: 'unit' },
        { header: 'Unit price', key: 'unitPrice', money: true },
        { header: 'Net', key: 'net', money: true },
        { header: 'Tax rate %', key: 'taxRate' },
        { header: 'Tax', key: 'tax', money: true },
        { header: 'Gross', key: 'gross', money: true },
        { header: 'Currency', key: 'currency' },
      ],
      rows: lines.map((l) => ({
        invoice: l.number,
        status: l.status,
        issuedOn: l.issued_on,
        dueOn: l.due_on,
        member: l.member,
        email: l.email,
        line: l.position,
        description: l.description,
        source: l.source_label,
        sourceRecord: `${l.source_type}:${l.source_id}`,
        from: l.service_from,
        to: l.service_to,
        quantity: l.quantity,
        unit: l.unit,
        unitPrice: l.unit_price_cents,
        net: l.amount_cents,
        taxRate: l.tax_rate_bp / 100,
        tax: l.tax_cents,
        gross: l.amount_cents + l.tax_cents,
        currency: l.currency.trim(),
      })),
    },
    {
      name: 'Credit notes',
      columns: [
        { header: 'Credit note', key: 'number' },
        { header: 'Date', key: 'issuedOn', date: true },
        { header: 'Invoice', key: 'invoice' },
        { header: 'Member', key: 'member' },
        { header: 'Kind', key: 'kind' },
        { header: 'Reason', key: 'reason' },
        { header: 'Net', key: 'net', money: true },
        { header: 'Tax', key: 'tax', money: true },
        { header: 'Gross', key: 'gross', money: true },
        { header: 'Currency', key: 'currency' },
      ],
      rows: credits.map((c) => ({
        number: c.number,
        issuedOn: c.issued_on,
        invoice: c.invoice_number,
        member: c.member,
        kind: c.kind === 'void' ? 'Replaces a voided invoice' : 'Refund or credit',
        reason: c.reason,
        net: c.subtotal_cents,
        tax: c.tax_cents,
        gross: c.total_cents,
        currency: c.currency.trim(),
      })),
    },
    {
      name: 'Payments',
      columns: [
        { header: 'Received', key: 'receivedOn', date: true },
        { header: 'Invoice', key: 'invoice' },
        { header: 'Member', key: 'member' },
        { header: 'Method', key: 'method' },
        { header: 'Reference', key: 'reference' },
        { header: 'Note', key: 'note' },
        { header: 'Amount', key: 'amount', money: true },
        { header: 'Currency', key: 'currency' },
      ],
      rows: payments.map((p) => ({
        receivedOn: p.received_on,
        invoice: p.invoice_number,
        member: p.member,
        method: paymentMethodLabels[p.method],
        reference: p.reference,
        note: p.note,
        amount: p.amount_cents,
        currency: p.currency.trim(),
      })),
    },
  ];
}

/**
 * One CSV: a `Record` column says which table each row belongs to (invoice line, credit note,
 * payment), so the accountant's import can split it. Amounts are decimals in the currency.
 */
export function ledgerCsv(sheets: Sheet[]): string {
  const headers = ['Record', ...new Set(sheets.flatMap((s) => s.columns.map((c) => c.header)))];
  const data: string[][] = [];
  for (const s of sheets) {
    const record = s.name.replace(/s$/, '').toLowerCase();
    for (const row of s.rows) {
      const out: Record<string, string> = { Record: record };
      for (const c of s.columns) out[c.header] = csvCell(row[c.key] ?? null, c.money);
      data.push(headers.map((h) => out[h] ?? ''));
    }
  }
  // A byte-order mark so spreadsheet programs read the file as UTF-8.
  return `\ufeff${Papa.unparse({ fields: headers, data }, { newline: '\r\n' })}\r\n`;
}

/** Amounts as decimals in the currency, other numbers as they are, text through the shared neutraliser. */
function csvCell(v: Cell, money = false): string {
  if (v === null) return '';
  if (typeof v === 'number') return money ? centsToDecimal(v) : String(v);
  return neutralise(v);
}

export async function ledgerXlsx(sheets: Sheet[], title: string): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Cellarwright';
  wb.title = title;
  for (const s of sheets) {
    const ws = wb.addWorksheet(s.name, { views: [{ state: 'frozen', ySplit: 1 }] });
    ws.columns = s.columns.map((c) => ({
      header: c.header,
      key: c.key,
      width: Math.max(c.date || c.money ? 12 : 10, c.header.length + 2),
      ...(c.date ? { style: { numFmt: XLSX_DATE_FORMAT } } : c.money ? { style: { numFmt: '#,##0.00' } } : {}),
    }));
    ws.getRow(1).font = { bold: true };
    for (const row of s.rows) {
      const values: Record<string, string | number | Date | null> = {};
      for (const c of s.columns) {
        const v = row[c.key] ?? null;
        if (c.date) values[c.key] = xlsxDate(typeof v === 'string' ? v : null);
        else values[c.key] = typeof v === 'number' ? (c.money ? v / 100 : v) : v === null ? null : neutralise(v);
      }
      const added = ws.addRow(values);
      // Amounts are numbers shown in their own currency, row by row.
      const currency = typeof row.currency === 'string' ? row.currency : null;
      for (const c of s.columns) if (c.money && currency) added.getCell(c.key).numFmt = xlsxMoneyFormat(currency);
    }
  }
  return Buffer.from(await wb.xlsx.writeBuffer());
}
