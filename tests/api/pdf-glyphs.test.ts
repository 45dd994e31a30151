import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createRequire } from 'node:module';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DAY } from '../../db/factories/common.ts';
import * as make from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { pdfFont, pdfFontFiles, renderPdf } from '../../backend/lib/pdf.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';

// Every PDF embeds the glyphs it prints: text read back from it has no replacement character, every
// character it prints is in the embedded font, and the marks our texts use (› ° € – and accented
// names) come back as written. A typical invoice fits on one page.

const require = createRequire(import.meta.url);
const fontkit = require('fontkit') as { openSync(file: string): { hasGlyphForCodePoint(cp: number): boolean } };
const fonts = Object.values(pdfFontFiles).map((file) => fontkit.openSync(file));

const FILE_NOW = new Date('2026-12-04T10:00:00Z');
const name = 'Zoë Łukasiewicz-Ångström';
let ctx: TestContext;
let treasurer: ApiClient;
let brewer: ApiClient;
const made = { invoice: '', creditNote: '', keg: '', batch: '' };

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cw-pdf-glyphs-'));
/** The PDF's text, page count and fonts, read back by poppler; kept under /tmp for a look. */
function readBack(label: string, pdf: Buffer) {
  const file = path.join(dir, `${label}.pdf`);
  fs.writeFileSync(file, pdf);
  const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
  const pages = Number(/^Pages:\s+(\d+)/m.exec(execFileSync('pdfinfo', [file], { encoding: 'utf8' }))?.[1]);
  const fontLines = execFileSync('pdffonts', [file], { encoding: 'utf8' }).split('\n').slice(2).filter(Boolean);
  return { text, pages, fontLines };
}

async function get(client: ApiClient, url: string): Promise<Buffer> {
  const res = await client.get(url).buffer(true).parse(binary);
  expect(res.status, url).toBe(200);
  expect(res.headers['content-type']).toMatch(/application\/pdf/);
  return res.body as Buffer;
}

function expectEveryGlyph(label: string, pdf: Buffer, marks: string[]) {
  const { text, fontLines } = readBack(label, pdf);
  expect(text, `${label}: replacement character`).not.toContain('\uFFFD');
  // Every font embedded (a subset of ours), none left for the viewer to substitute.
  expect(fontLines.length).toBeGreaterThan(0);
  for (const line of fontLines) expect(line, `${label}: ${line}`).toMatch(/DejaVuSansCondensed.*\byes\b/);
  const missing = [...new Set([...text].filter((ch) => !/\s/.test(ch) && !fonts.every((f) => f.hasGlyphForCodePoint(ch.codePointAt(0)!))))];
  expect(missing, `${label}: characters without a glyph`).toEqual([]);
  const flat = text.replace(/\s+/g, ' ');
  for (const mark of marks) expect(flat, `${label}: ${mark}`).toContain(mark);
  return { text, flat };
}

beforeAll(async () => {
  ctx = await createTestContext({}, { now: FILE_NOW });
  treasurer = await ctx.signIn('treasurer@example.org');
  brewer = await ctx.signIn('brewer@example.org');
  const member = await make.createMember(ctx.db, { name, email: 'zoe.glyphs@example.org', createdAt: '2026-08-01T09:00:00Z' });

  // A typical month: a fermenter and a keg booked, dues, and a charge whose text uses the marks.
  const fermenter = await make.createFermenter(ctx.db);
  const keg = await make.createKeg(ctx.db);
  await make.createBooking(ctx.db, {
    equipmentId: fermenter.id,
    ownerId: member.id,
    startsAt: '2026-11-03T09:00:00Z',
    endsAt: '2026-11-17T09:00:00Z',
    now: FILE_NOW,
  });
  await make.createBooking(ctx.db, {
    equipmentId: keg.id,
    ownerId: member.id,
    startsAt: '2026-11-17T09:00:00Z',
    endsAt: '2026-11-28T09:00:00Z',
    now: FILE_NOW,
  });
  await make.createManualCharge(ctx.db, {
    memberId: member.id,
    period: '2026-11',
    amountCents: 450,
    description: 'Cold room › 2 °C – one extra week',
    reason: 'Asked for at the hand-over',
  });
  const invoice = await make.createInvoice(ctx.db, { memberId: member.id, period: '2026-11', today: '2026-12-01', actorId: fixtureUserId('treasurer') });
  made.invoice = invoice.id;
  const refund = await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { amountCents: 300, reason: 'Keg returned warm › 12 °C – Zoë’s week away' });
  expect(refund.status).toBe(201);
  made.creditNote = refund.body.creditNote?.id ?? refund.body.note?.id ?? refund.body.invoice.creditNotes[0].id;

  // A keg cleaned and sanitized, then filled from a batch with an accented name.
  const filled = await make.createKeg(ctx.db);
  await make.createSanitationCycle(ctx.db, { equipmentId: filled.id, readyAt: new Date(FILE_NOW.getTime() - 3 * DAY) });
  const batch = await make.createBatch(ctx.db, {
    ownerId: member.id,
    name: 'Bière de garde – Château',
    style: 'Bière de garde',
    readings: [
      { takenAt: new Date(FILE_NOW.getTime() - 20 * DAY), value: 1.06 },
      { takenAt: new Date(FILE_NOW.getTime() - 5 * DAY), value: 1.01 },
    ],
  });
  await make.fillKeg(ctx.db, { kegId: filled.id, at: new Date(FILE_NOW.getTime() - 2 * DAY), batchId: batch.id, ownerId: member.id });
  made.keg = filled.id;
  made.batch = batch.id;
});
afterAll(async () => {
  await ctx?.close();
});

describe('PDFs print every glyph', () => {
  it('the one PDF font has every mark our texts use, in regular, bold and italic', async () => {
    const marks = 'Settings › Shelf life · 2 °C – 4 °C — €12.50 £3 “quoted” ‘single’ … Zoë Łódź Ångström Śląsk Čapek Dvořák Øre ß œ ő ű ș ț → ≤ ≥ ±';
    const pdf = await renderPdf({
      content: [{ text: marks }, { text: marks, bold: true }, { text: marks, italics: true }, { text: marks, bold: true, italics: true }],
      defaultStyle: { font: pdfFont },
    });
    const { text } = expectEveryGlyph('marks', pdf, ['›', '°', '€', '–', '—', 'Zoë', 'Łódź', 'Dvořák', 'ș', '→']);
    // Four styles, four embedded faces.
    expect(readBack('marks', pdf).fontLines.length).toBe(4);
    expect(text.split(marks.slice(0, 20)).length - 1).toBe(4);
  });

  it('the invoice: accented name, €, ›, °, – and one page', async () => {
    const pdf = await get(treasurer, `/api/invoices/${made.invoice}/pdf`);
    // The co-op's payment note (Settings) points the way with an arrow.
    expectEveryGlyph('invoice', pdf, [name, '€', 'Cold room › 2 °C – one extra week', 'How to pay', 'Billing → My invoices']);
    expect(readBack('invoice', pdf).pages).toBe(1);
  });

  it('the credit note', async () => {
    const pdf = await get(treasurer, `/api/credit-notes/${made.creditNote}/pdf`);
    expectEveryGlyph('credit-note', pdf, [name, '€', 'Keg returned warm › 12 °C – Zoë’s week away']);
  });

  it('the sanitation audit', async () => {
    const pdf = await get(brewer, `/api/reports/sanitation-audit.pdf?from=2026-11-01&to=2026-12-04&equipmentId=${made.keg}`);
    const { flat } = expectEveryGlyph('sanitation-audit', pdf, ['keg’s', 'Bière de garde – Château']);
    // Times in the one format, never raw timestamps.
    expect(flat).not.toMatch(/\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/);
    expect(flat).toContain('Period 1 Nov 2026 to 4 Dec 2026');
  });

  it('the trace of a batch', async () => {
    const pdf = await get(brewer, `/api/batches/${made.batch}/trace.pdf`);
    const { flat } = expectEveryGlyph('trace', pdf, ['Bière de garde – Château', name, 'keg’s']);
    expect(flat).not.toMatch(/\d{4}-\d{2}-\d{2}/);
    expect(flat).toContain('as of 4 Dec 2026');
  });
});
