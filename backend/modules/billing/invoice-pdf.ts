import type { Content, TableCell, TDocumentDefinitions } from 'pdfmake/interfaces';
import { longDate, periodLabel } from '../../../shared/billing/dates.ts';
import { formatMoney, formatRate } from '../../../shared/billing/money.ts';
import type { BillingProfile, CreditNote, InvoiceDetail } from '../../../shared/schemas/billing.ts';
import { framedDocument, pdfColours, type PdfCoop } from '../../lib/pdf-frame.ts';
import { renderPdf } from '../../lib/pdf.ts';

const { ink, muted, copper, rule } = pdfColours;

/** The co-op as its invoices name it: coopProfile() from the settings service. */
export type InvoiceCoop = BillingProfile & PdfCoop;

const statusMarks: Record<InvoiceDetail['status'], string | null> = {
  draft: 'DRAFT — not yet issued',
  issued: null,
  paid: 'PAID',
  void: 'VOID — replaced by a credit note',
};

export interface InvoicePdfInput {
  invoice: InvoiceDetail;
  profile: InvoiceCoop;
  /** Where members sign in to pay online. */
  appUrl: string;
  /** When the PDF is made (the app's clock), printed in the footer. */
  producedAt: Date;
}

function money(cents: number, currency: string) {
  return formatMoney(cents, currency, 'en-GB');
}

function quantity(q: number, unit: string): string {
  const n = Number.isInteger(q) ? String(q) : q.toFixed(3).replace(/0+$/, '');
  return `${n} ${unit}${q === 1 || unit === 'item' ? '' : 's'}`.replace(/ items?$/, '');
}

const th = (text: string, alignment: 'left' | 'right' = 'left'): TableCell => ({ text, color: muted, fontSize: 8, alignment, margin: [0, 2, 0, 2] });

function linesTable(inv: InvoiceDetail): Content {
  const c = inv.currency;
  const body: TableCell[][] = [
    [th('Charge'), th('From'), th('Quantity', 'right'), th('Unit price', 'right'), th('Tax', 'right'), th('Amount', 'right')],
    ...inv.lines.map((l): TableCell[] => [
      { text: l.description },
      { text: l.sourceLabel, color: muted },
      { text: quantity(l.quantity, l.unit), alignment: 'right', noWrap: true },
      { text: money(l.unitPriceCents, c), alignment: 'right', noWrap: true },
      { text: formatRate(l.taxRateBp), alignment: 'right', noWrap: true, color: muted },
      { text: money(l.amountCents, c), alignment: 'right', noWrap: true },
    ]),
  ];
  return {
    table: { headerRows: 1, widths: ['*', '*', 'auto', 'auto', 'auto', 'auto'], body },
    layout: {
      hLineWidth: (i: number) => (i === 1 ? 0.8 : 0.3),
      vLineWidth: () => 0,
      hLineColor: () => rule,
      paddingTop: () => 3,
      paddingBottom: () => 3,
    },
    fontSize: 9,
  };
}

function taxBreakdown(inv: InvoiceDetail): { rate: number; net: number; tax: number }[] {
  const byRate = new Map<number, { rate: number; net: number; tax: number }>();
  for (const l of inv.lines) {
    const r = byRate.get(l.taxRateBp) ?? { rate: l.taxRateBp, net: 0, tax: 0 };
    r.net += l.amountCents;
    r.tax += l.taxCents;
    byRate.set(l.taxRateBp, r);
  }
  return [...byRate.values()].sort((a, b) => a.rate - b.rate);
}

function totals(inv: InvoiceDetail): Content {
  const c = inv.currency;
  const row = (label: string, value: string, strong = false): TableCell[] => [
    { text: label, color: strong ? ink : muted, fontSize: strong ? 11 : 9 },
    { text: value, alignment: 'right', fontSize: strong ? 11 : 9, color: strong ? ink : ink, noWrap: true },
  ];
  const body: TableCell[][] = [row('Subtotal', money(inv.subtotalCents, c))];
  for (const t of taxBreakdown(inv)) body.push(row(`Tax at ${formatRate(t.rate)} on ${money(t.net, c)}`, money(t.tax, c)));
  body.push(row('Total', money(inv.totalCents, c), true));
  if (inv.creditedCents) body.push(row('Credited (credit notes)', money(-inv.creditedCents, c)));
  if (inv.paidCents) body.push(row('Paid', money(-inv.paidCents, c)));
  if (inv.status !== 'draft') body.push(row(inv.amountDueCents < 0 ? 'In credit' : 'Amount due', money(inv.amountDueCents, c), true));
  return {
    columns: [
      { width: '*', text: '' },
      {
        width: 260,
        table: { widths: ['*', 'auto'], body },
        layout: {
          hLineWidth: (i: number, node: { table: { body: unknown[] } }) => (i === node.table.body.length - 1 || i === 1 ? 0.3 : 0),
          vLineWidth: () => 0,
          hLineColor: () => rule,
        },
      },
    ],
    margin: [0, 10, 0, 0],
  };
}

function creditNotesBlock(notes: CreditNote[]): Content[] {
  if (notes.length === 0) return [];
  return [
    { text: 'Credit notes on this invoice', fontSize: 10, color: copper, margin: [0, 16, 0, 4] },
    ...notes.map((n): Content => ({
      text: `${n.number} of ${longDate(n.issuedOn)} (${n.kind === 'void' ? 'replaces the voided invoice' : 'refund or credit'}): ${money(n.totalCents, n.currency)} — ${n.reason}`,
      fontSize: 9,
    })),
  ];
}

/** Who the document is for (its label, name and e-mail) on the left, its numbers and dates on the right. */
function partyAndMeta(label: string, name: string, email: string, meta: [string, string][]): Content {
  return {
    columns: [
      {
        width: '*',
        stack: [{ text: label, color: muted, fontSize: 8, margin: [0, 0, 0, 2] }, { text: name }, { text: email, color: muted, fontSize: 9 }],
      },
      {
        width: 'auto',
        table: {
          body: meta.map(([k, v]): TableCell[] => [
            { text: k, color: muted, fontSize: 9, noWrap: true },
            { text: v, fontSize: 9, alignment: 'right', noWrap: true },
          ]),
        },
        layout: 'noBorders',
      },
    ],
    margin: [0, 24, 0, 18],
  };
}

function howToPay(inv: InvoiceDetail, profile: BillingProfile, appUrl: string): Content[] {
  if (inv.status === 'void' || inv.status === 'draft' || inv.amountDueCents <= 0) return [];
  const ref = inv.number ?? '';
  return [
    { text: 'How to pay', fontSize: 10, color: copper, margin: [0, 18, 0, 4], headlineLevel: 1 },
    {
      ul: [
        `Online: sign in at ${appUrl}/billing/my-invoices and choose Pay online.`,
        `Bank transfer to ${profile.bankAccountName}, account ${profile.bankAccount}, quoting ${ref} as the reference.`,
        'Cash: hand it to the treasurer and ask for a receipt.',
      ],
      fontSize: 9,
    },
    ...(profile.paymentNote ? [{ text: profile.paymentNote, fontSize: 9, color: muted, margin: [0, 4, 0, 0] } as Content] : []),
  ];
}

export function invoiceDocument({ invoice: inv, profile, appUrl, producedAt }: InvoicePdfInput): TDocumentDefinitions {
  const mark = statusMarks[inv.status];
  const meta: [string, string][] = [
    ['Invoice number', inv.number ?? 'not yet issued'],
    ['Invoice date', inv.issuedOn ? longDate(inv.issuedOn) : '—'],
    ['Due date', inv.dueOn ? longDate(inv.dueOn) : '—'],
    ['Period', periodLabel(inv.period)],
  ];
  return framedDocument({
    coop: profile,
    title: 'Invoice',
    marks: mark ? [mark] : [],
    reference: inv.number ?? 'Draft',
    producedAt,
    subject: `Invoice ${inv.number ?? 'draft'} for ${periodLabel(inv.period)}`,
    ...(mark ? { watermark: { text: mark.split(' — ')[0]!, color: inv.status === 'paid' ? '#4b5a26' : '#8a8277', opacity: 0.12, fontSize: 80 } } : {}),
    content: [
      partyAndMeta('Billed to', inv.memberName, inv.memberEmail, meta),
      inv.lines.length ? linesTable(inv) : { text: 'No charges.', color: muted },
      totals(inv),
      ...creditNotesBlock(inv.creditNotes),
      // How to pay and the closing note stay together: a page never starts with a lone bullet.
      {
        stack: [
          ...howToPay(inv, profile, appUrl),
          {
            text: `Amounts in ${inv.currency}. Each line is rounded to the cent on its own (halves away from zero), and so is its tax; the invoice's tax is the sum of its lines' tax.`,
            fontSize: 7.5,
            color: muted,
            margin: [0, 18, 0, 0],
          },
        ],
        unbreakable: true,
      },
    ],
  });
}

export async function renderInvoicePdf(input: InvoicePdfInput): Promise<Buffer> {
  return renderPdf(invoiceDocument(input));
}

export function invoicePdfFilename(inv: Pick<InvoiceDetail, 'number' | 'period' | 'id'>): string {
  return `invoice-${inv.number ?? `draft-${inv.period}-${inv.id.slice(0, 8)}`}.pdf`;
}

export interface CreditNotePdfInput {
  note: CreditNote;
  invoice: InvoiceDetail;
  profile: InvoiceCoop;
  /** When the PDF is made (the app's clock), printed in the footer. */
  producedAt: Date;
  /** Money recorded as paid back with this credit note, if any; without it the note is a credit only. */
  refund: { amountCents: number; method: 'bank_transfer' | 'cash'; on: string } | null;
}

export function creditNoteDocument({ note, invoice, profile, refund, producedAt }: CreditNotePdfInput): TDocumentDefinitions {
  const c = note.currency;
  const meta: [string, string][] = [
    ['Credit note', note.number],
    ['Date', longDate(note.issuedOn)],
    ['For invoice', invoice.number ?? '—'],
    ['Period', periodLabel(invoice.period)],
  ];
  const body: TableCell[][] = [
    [th('Credited'), th('Tax', 'right'), th('Tax amount', 'right'), th('Amount', 'right')],
    ...note.lines.map((l): TableCell[] => [
      { text: l.description },
      { text: formatRate(l.taxRateBp), alignment: 'right', color: muted, noWrap: true },
      { text: money(l.taxCents, c), alignment: 'right', noWrap: true },
      { text: money(l.amountCents, c), alignment: 'right', noWrap: true },
    ]),
  ];
  const settled = refund
    ? `${money(refund.amountCents, c)} was paid back ${refund.method === 'cash' ? 'in cash' : 'by bank transfer'} on ${longDate(refund.on)}.`
    : `The credit reduces what is owed on invoice ${invoice.number}; anything already paid beyond that stays as credit on your account.`;
  return framedDocument({
    coop: profile,
    title: 'Credit note',
    marks: [note.kind === 'void' ? `Replaces invoice ${invoice.number}, which is void` : refund ? 'Credit and refund' : 'Credit'],
    reference: note.number,
    producedAt,
    content: [
      partyAndMeta('Credited to', invoice.memberName, invoice.memberEmail, meta),
      { text: `Reason: ${note.reason}`, margin: [0, 0, 0, 10] },
      {
        table: { headerRows: 1, widths: ['*', 'auto', 'auto', 'auto'], body },
        layout: { hLineWidth: (i: number) => (i === 1 ? 0.8 : 0.3), vLineWidth: () => 0, hLineColor: () => rule, paddingTop: () => 3, paddingBottom: () => 3 },
        fontSize: 9,
      },
      {
        columns: [
          { width: '*', text: '' },
          {
            width: 240,
            table: {
              widths: ['*', 'auto'],
              body: [
                [
                  { text: 'Credited before tax', color: muted, fontSize: 9 },
                  { text: money(note.subtotalCents, c), alignment: 'right', fontSize: 9 },
                ],
                [
                  { text: 'Tax credited', color: muted, fontSize: 9 },
                  { text: money(note.taxCents, c), alignment: 'right', fontSize: 9 },
                ],
                [
                  { text: 'Total credited', fontSize: 11 },
                  { text: money(note.totalCents, c), alignment: 'right', fontSize: 11 },
                ],
              ],
            },
            layout: { hLineWidth: (i: number) => (i === 2 ? 0.3 : 0), vLineWidth: () => 0, hLineColor: () => rule },
          },
        ],
        margin: [0, 10, 0, 0],
      },
      { text: settled, fontSize: 9, margin: [0, 16, 0, 0] },
    ],
  });
}

export async function renderCreditNotePdf(input: CreditNotePdfInput): Promise<Buffer> {
  return renderPdf(creditNoteDocument(input));
}
