import { describe, expect, it } from 'vitest';
import type { CreditNote, InvoiceDetail } from '../../../shared/schemas/billing.ts';
import { defaultBillingProfile } from '../../../shared/schemas/billing.ts';
import { defaultSanitationSettings } from '../../../shared/schemas/cellar-settings.ts';
import type { Equipment } from '../../../shared/schemas/equipment.ts';
import { pdfText } from '../../../tests/helpers/pdf.ts';
import { renderCreditNotePdf, renderInvoicePdf } from '../../modules/billing/invoice-pdf.ts';
import { renderLabelSheet } from '../../modules/equipment/labels-pdf.service.ts';
import { renderAuditPdf } from '../../modules/sanitation/audit-report.ts';
import { tracePdf } from '../../modules/batches/trace.service.ts';
import { framedDocument } from '../pdf-frame.ts';

// Every document is framed the same way: the co-op's name from its settings (never a fixed name),
// the produced date from the clock in the co-op's time zone, and "Page x of y".

const profile = {
  ...defaultBillingProfile,
  coopName: 'Quarry Lane Brewers',
  addressLines: ['2 Quarry Lane', 'Stonebridge'],
  email: 'books@quarry.example',
  timeZone: 'Europe/Berlin',
};
const producedAt = new Date('2031-03-04T09:30:00Z');
const produced = '4 Mar 2031, 10:30 (Europe/Berlin)';

const invoice = {
  id: '00000000-0000-4000-8000-000000000001',
  number: 'INV-2031-0007',
  status: 'issued',
  period: '2031-02',
  issuedOn: '2031-03-01',
  dueOn: '2031-03-15',
  memberName: 'Ada Kettleby',
  memberEmail: 'ada@example.org',
  currency: 'EUR',
  lines: [],
  subtotalCents: 0,
  totalCents: 0,
  creditedCents: 0,
  paidCents: 0,
  amountDueCents: 0,
  creditNotes: [],
  payments: [],
} as unknown as InvoiceDetail;
const note = {
  id: 'n1',
  number: 'CN-2031-0001',
  kind: 'credit',
  issuedOn: '2031-03-02',
  currency: 'EUR',
  reason: 'Keg returned warm',
  lines: [],
  subtotalCents: 0,
  taxCents: 0,
  totalCents: 0,
} as unknown as CreditNote;

function expectFramed(text: string) {
  const flat = text.replace(/\s+/g, ' ');
  expect(flat).toContain('Quarry Lane Brewers');
  expect(flat).not.toContain(defaultBillingProfile.coopName);
  const pages = Number(/Page 1 of (\d+)/.exec(flat)?.[1]);
  expect(pages).toBeGreaterThan(0);
  expect(flat).toContain(`Page ${pages} of ${pages}`);
  expect(flat).toContain(produced);
}

describe('the one PDF frame', () => {
  it('frames an invoice and a credit note with the letterhead, the footer and the page numbers', async () => {
    const inv = pdfText(await renderInvoicePdf({ invoice, profile, appUrl: 'http://localhost', producedAt }));
    expectFramed(inv);
    expect(inv).toContain('2 Quarry Lane');
    expect(inv).toContain('INV-2031-0007 · Page 1 of 1');
    const cn = pdfText(await renderCreditNotePdf({ note, invoice, profile, refund: null, producedAt }));
    expectFramed(cn);
    expect(cn).toContain('CN-2031-0001 · Page 1 of 1');
  });

  it('frames the sanitation audit and the trace, with the safety cautions', async () => {
    const audit = pdfText(
      await renderAuditPdf(
        {
          from: new Date('2031-02-01T00:00:00Z'),
          to: new Date('2031-03-01T00:00:00Z'),
          producedAt,
          coop: profile,
          vessels: [],
          exceptions: [],
          settings: defaultSanitationSettings,
        },
        'every fermenter and keg',
      ),
    );
    expectFramed(audit);
    expect(audit).toContain('Safety cautions');
    const trace = pdfText(await tracePdf('Trace report', 'Kegs filled in February.', [], producedAt, profile));
    expectFramed(trace);
    expect(trace).toContain('Safety cautions');
  });

  it('names the co-op on every equipment label and in the sheet', async () => {
    const keg = {
      id: '00000000-0000-4000-8000-000000000002',
      code: 'K-001',
      name: '19 L keg',
      kind: 'keg',
      capacityLiters: 19,
      attributes: {},
    } as unknown as Equipment;
    const text = pdfText(await renderLabelSheet([keg], 'http://localhost', profile)).replace(/\s+/g, ' ');
    expect(text).toContain('K-001');
    expect(text).toContain('Quarry Lane Brewers');
  });

  it('lays out a running header that certainly fits as one line, and lets a longer one wrap', () => {
    const headerOf = (coopName: string) => {
      const doc = framedDocument({
        coop: { ...profile, coopName },
        title: 'Sanitation audit',
        producedAt,
        density: 'report',
        runningHeader: `${coopName} · Sanitation audit 1 Feb 2031 to 28 Feb 2031`,
        content: [],
      });
      return (doc.header as unknown as (page: number) => { text: string; noWrap?: boolean })(2);
    };
    expect(headerOf('Quarry Lane Brewers')).toMatchObject({ text: 'Quarry Lane Brewers · Sanitation audit 1 Feb 2031 to 28 Feb 2031', noWrap: true });
    expect(headerOf('W'.repeat(120)).noWrap).toBe(false);
    expect(headerOf('Пивоварня '.repeat(5)).noWrap).toBe(false);
  });
});
