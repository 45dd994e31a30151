import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createInvoice, createInvoicePayment, createMember, type InvoiceWithLines } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';

// Spreadsheets that open right: days are date cells shown as days, amounts are numbers shown in their
// currency, read back here with a spreadsheet library.

let ctx: TestContext;
let treasurer: ApiClient;
let invoice: InvoiceWithLines;

beforeAll(async () => {
  ctx = await createTestContext();
  treasurer = await ctx.signIn('treasurer@example.org');
  // A member of this file's own: November's dues, issued 1 December, part-paid on 2 December, then 5.00 credited.
  const member = await createMember(ctx.db, { email: 'xlsx-types.test@example.org', createdAt: '2026-10-01T09:00:00Z' });
  invoice = await createInvoice(ctx.db, { memberId: member.id, period: '2026-11', today: '2026-12-01', actorId: fixtureUserId('treasurer') });
  await createInvoicePayment(ctx.db, { invoiceId: invoice.id, amountCents: 1000, receivedOn: '2026-12-02', actorId: fixtureUserId('treasurer') });
  expect((await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { amountCents: 500, reason: 'Dues waived for a week away' })).status).toBe(201);
});
afterAll(async () => {
  await ctx?.close();
});

async function workbook(client: ApiClient, url: string): Promise<ExcelJS.Workbook> {
  const res = await client.get(url).buffer(true).parse(binary);
  expect(res.status, url).toBe(200);
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(res.body);
  return wb;
}

/** The cells of the row whose column `key` holds `value`, by header. */
function rowWhere(ws: ExcelJS.Worksheet, header: string, value: string): Record<string, ExcelJS.Cell> {
  const headers = (ws.getRow(1).values as unknown[]).map((v) => (typeof v === 'string' ? v : ''));
  for (let n = 2; n <= ws.rowCount; n++) {
    const row = ws.getRow(n);
    if (row.getCell(headers.indexOf(header)).value === value) {
      return Object.fromEntries(headers.map((h, i) => [h, row.getCell(i)] as const).filter(([h]) => h));
    }
  }
  throw new Error(`no row of ${ws.name} with ${header} = ${value}`);
}

const asDay = (cell: ExcelJS.Cell) => {
  expect(cell.value, cell.address).toBeInstanceOf(Date);
  expect(cell.numFmt, cell.address).toBe('yyyy-mm-dd');
  return (cell.value as Date).toISOString();
};

const asMoney = (cell: ExcelJS.Cell) => {
  expect(typeof cell.value, cell.address).toBe('number');
  expect(cell.numFmt, cell.address).toBe('"€"#,##0.00;-"€"#,##0.00');
  return cell.value as number;
};

describe('XLSX exports type their cells', () => {
  it('the ledger writes days as dates and amounts as numbers in the invoice’s currency', async () => {
    const wb = await workbook(treasurer, '/api/invoices/export?period=2026-11&format=xlsx');

    const line = rowWhere(wb.getWorksheet('Invoice lines')!, 'Invoice', invoice.number!);
    expect(asDay(line['Invoice date']!)).toBe('2026-12-01T00:00:00.000Z');
    expect(asDay(line['Due date']!)).toBe(`${invoice.due_on}T00:00:00.000Z`);
    expect(asDay(line['From']!)).toMatch(/^2026-11-\d{2}T00:00:00\.000Z$/);
    expect(asDay(line['To']!)).toMatch(/^2026-11-\d{2}T00:00:00\.000Z$/);
    // Dues 15.00 + 8 % tax.
    expect([asMoney(line['Unit price']!), asMoney(line['Net']!), asMoney(line['Tax']!), asMoney(line['Gross']!)]).toEqual([15, 15, 1.2, 16.2]);
    expect(line['Currency']!.value).toBe('EUR');

    const credit = rowWhere(wb.getWorksheet('Credit notes')!, 'Invoice', invoice.number!);
    expect(asDay(credit['Date']!)).toMatch(/^\d{4}-\d{2}-\d{2}T00:00:00\.000Z$/);
    expect(asMoney(credit['Gross']!)).toBe(5);

    const payment = rowWhere(wb.getWorksheet('Payments')!, 'Invoice', invoice.number!);
    expect(asDay(payment['Received']!)).toBe('2026-12-02T00:00:00.000Z');
    expect(asMoney(payment['Amount']!)).toBe(10);
  });

  it('the readings template writes its times as dates with a time format', async () => {
    const wb = await workbook(await ctx.signIn('brewer@example.org'), '/api/readings/template.xlsx');
    const ws = wb.getWorksheet('Readings')!;
    const cell = ws.getRow(2).getCell(1);
    expect(cell.value).toBeInstanceOf(Date);
    expect(cell.numFmt).toBe('yyyy-mm-dd hh:mm');
    expect(typeof ws.getRow(2).getCell(2).value).toBe('number');
  });
});
