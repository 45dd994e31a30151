// Invoice and credit-note PDFs, the invoice e-mail and the ledger export, after October's and November's runs. The co-op, its members, fermenters, kegs and price list as of 1 December 2026 are
// tests/helpers/billing-file.ts's (its header tells the hand-worked figures).
import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { addDays, longDate } from '../../shared/billing/dates.ts';
import { ctx, treasurer, useBillingFile } from '../helpers/billing-file.ts';
import { binary } from '../helpers/http.ts';
import { pdfText } from '../helpers/pdf.ts';
import { FAR_AHEAD, withClockAt } from '../helpers/time.ts';

const { ids, invoiceOf } = useBillingFile({ billed: true });

describe('documents', () => {
  it('renders an invoice PDF whose text names the co-op, member, number, dates, sources, tax, total and how to pay', async () => {
    const inv = await invoiceOf(ids.a, '2026-11');
    const res = await treasurer.get(`/api/invoices/${inv.id}/pdf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const text = pdfText(res.body as Buffer).replace(/\s+/g, ' ');
    expect(text).toContain('Larkspur Yard Brewing Co-op');
    expect(text).toContain('17 Maltings Lane');
    expect(text).toContain('Test Member Alder');
    expect(text).toContain(inv.number!);
    expect(text).toContain(longDate(inv.issuedOn!)); // invoice date
    expect(text).toContain(longDate(addDays(inv.issuedOn!, 14))); // due after the 14-day terms
    expect(text).toContain('F-90, 1–5 Nov, 4 days');
    expect(text).toContain('Tax at 7.5 %');
    expect(text).toContain('€27.96');
    expect(text).toMatch(/How to pay/);
    expect(text).toContain(`quoting ${inv.number}`);
  });

  it('renders a credit note PDF for the treasurer and the member it credits, and no one else', async () => {
    const note = await ctx.db
      .selectFrom('credit_note')
      .innerJoin('app_user', 'app_user.id', 'credit_note.member_id')
      .select(['credit_note.id', 'credit_note.number', 'credit_note.total_cents', 'app_user.email'])
      .where('credit_note.kind', '=', 'refund')
      .where('app_user.email', 'like', '%@example.org')
      .where('credit_note.member_id', '<>', ids.b)
      .executeTakeFirstOrThrow();
    const res = await treasurer.get(`/api/credit-notes/${note.id}/pdf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const text = pdfText(res.body as Buffer).replace(/\s+/g, ' ');
    expect(text).toContain('Credit note');
    expect(text).toContain(note.number);
    expect(text).toMatch(/was paid back by bank transfer/);
    const owner = await ctx.signIn(note.email);
    expect((await owner.get(`/api/credit-notes/${note.id}/pdf`)).status).toBe(200);
    const other = await ctx.signIn(note.email === 'member@example.org' ? 'member2@example.org' : 'member@example.org');
    expect((await other.get(`/api/credit-notes/${note.id}/pdf`)).status).toBe(404);
  });

  it('e-mails the invoice with its PDF attached, through the queue', async () => {
    const inv = await invoiceOf(ids.a, '2026-11');
    const res = await treasurer.post(`/api/invoices/${inv.id}/send`);
    expect(res.status).toBe(202);
    expect(res.body).toMatchObject({ queued: true, to: 'alder.test@example.org' });
    const mail = await ctx.waitForMail('alder.test@example.org', /Invoice INV-2026-/);
    expect(mail.subject).toContain(inv.number!);
    expect(mail.text_body).toContain('€27.96');
    expect(mail.raw).toMatch(/Content-Type: application\/pdf/);
    expect(mail.raw).toContain(`invoice-${inv.number}.pdf`);
    const sent = await invoiceOf(ids.a, '2026-11');
    expect(sent.sentAt).toBeTruthy();
  });

  it('exports a period’s lines, credit notes and payments as CSV and XLSX with formula-like text neutralised', async () => {
    // Charges whose text a spreadsheet would run, on an invoice of C's for September.
    const draft = await ctx.db.insertInto('invoice').values({ member_id: ids.c, period: '2026-09', currency: 'EUR' }).returning('id').executeTakeFirstOrThrow();
    for (const description of ['=HYPERLINK("http://example.org","x")', '@SUM(A1)', '+44 phone fee', '-10% spoilage']) {
      const r = await treasurer.post('/api/manual-charges', {
        memberId: ids.c,
        period: '2026-09',
        description,
        reason: 'Typed by the treasurer',
        amountCents: 150,
      });
      expect(r.status).toBe(201);
    }
    expect((await treasurer.post(`/api/invoices/${draft.id}/issue`)).status).toBe(200);
    const csv = await treasurer.get('/api/invoices/export?period=2026-09&format=csv');
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/cellarwright-ledger-2026-09\.csv/);
    expect(csv.text).toContain(`"'=HYPERLINK(""http://example.org"",""x"")"`);
    expect(csv.text).toContain(",'@SUM(A1),");
    expect(csv.text).toContain(",'+44 phone fee,");
    expect(csv.text).toContain(",'-10% spoilage,");
    expect(csv.text).not.toMatch(/(^|,)"?[=@+]/m);
    // Amounts stay numbers; September's voided invoice brings its credit note, and its paid invoices their payments.
    const lines = csv.text.split('\r\n');
    expect(lines[0]).toMatch(/^\ufeffRecord,Invoice,Status/);
    expect(lines.some((l) => l.startsWith('credit note,'))).toBe(true);
    expect(lines.some((l) => l.startsWith('payment,'))).toBe(true);
    expect(lines.some((l) => /,1\.50,/.test(l))).toBe(true);

    const xlsx = await treasurer.get('/api/invoices/export?period=2026-09&format=xlsx').buffer(true).parse(binary);
    expect(xlsx.status).toBe(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.body);
    expect(wb.worksheets.map((w) => w.name)).toEqual(['Invoice lines', 'Credit notes', 'Payments']);
    const sheet = wb.getWorksheet('Invoice lines')!;
    const texts: string[] = [];
    const amounts: unknown[] = [];
    sheet.eachRow((row, n) => {
      if (n === 1) return;
      const described = row.getCell(8).value;
      texts.push(typeof described === 'string' ? described : JSON.stringify(described));
      amounts.push(row.getCell(16).value);
    });
    expect(texts).toContain('\'=HYPERLINK("http://example.org","x")');
    expect(texts).toContain("'-10% spoilage");
    expect(texts.some((t) => /^[=+\-@]/.test(t))).toBe(false);
    expect(amounts.every((a) => typeof a === 'number')).toBe(true);
  });
});

describe('stamps follow the clock', () => {
  it('stamps a sent invoice with the clock’s time, whatever the real date', async () => {
    const inv = await invoiceOf(ids.a, '2026-11');
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      expect((await treasurer.post(`/api/invoices/${inv.id}/send`)).status).toBe(202);
      expect((await treasurer.get(`/api/invoices/${inv.id}`)).body.invoice.sentAt).toBe(FAR_AHEAD);
      const row = await ctx.db.selectFrom('invoice').select(['sent_at', 'updated_at']).where('id', '=', inv.id).executeTakeFirstOrThrow();
      expect(row).toEqual({ sent_at: new Date(FAR_AHEAD), updated_at: new Date(FAR_AHEAD) });
    });
  });

  it('stamps a saved billing profile with the clock’s time, whatever the real date', async () => {
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const current = (await treasurer.get('/api/billing/profile')).body.profile;
      expect((await treasurer.put('/api/billing/profile', current)).status).toBe(200);
      const row = await ctx.db.selectFrom('setting').select(['updated_at', 'updated_by']).where('key', '=', 'billing_profile').executeTakeFirstOrThrow();
      expect(row).toEqual({ updated_at: new Date(FAR_AHEAD), updated_by: treasurer.user.id });
    });
  });
});
