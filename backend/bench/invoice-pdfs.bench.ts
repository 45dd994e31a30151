// Invoice PDFs: the time to produce 500 of them, as the e-mailing of a month's run or a bulk
// download would. The demo co-op's issued invoices (September and October) are cycled through
// until 500 are made: first with each invoice already loaded (pdfmake's layout and font
// embedding alone), then end to end (read the invoice, its lines, payments and credit notes, then
// render). The fonts are TrueType, read once into pdfmake's virtual file system (backend/lib/pdf.ts).
// Prints times and peak memory; not a test.
import { coopProfile } from '../modules/settings/settings.service.ts';
import { invoiceDocument, renderInvoicePdf } from '../modules/billing/invoice-pdf.ts';
import { getDetail } from '../modules/billing/invoices.service.ts';
import { benchDatabase, peakRssMiB } from './bench-db.ts';
import { atMost, reportTarget } from './report.ts';

const COUNT = Number(process.env.BENCH_INVOICE_PDFS ?? 500);
const appUrl = 'http://127.0.0.1:3000';

const bench = await benchDatabase('invoice_pdfs');
try {
  const { db } = bench;
  const today = '2026-12-01';
  const ids = (await db.selectFrom('invoice').select('id').where('status', '<>', 'draft').orderBy('number_year').orderBy('number_seq').execute()).map(
    (r) => r.id,
  );
  if (ids.length === 0) throw new Error('the demo seed made no invoices');
  const profile = await coopProfile(db);
  const producedAt = new Date('2026-12-01T09:00:00Z');
  const details = await Promise.all(ids.map((id) => getDetail(db, id, today)));
  const lines = details.reduce((s, d) => s + d.lines.length, 0);
  console.log(`  ${ids.length} demo invoices (${(lines / ids.length).toFixed(1)} lines each on average), cycled to ${COUNT} PDFs`);

  // Warm-up: the first document loads and parses the font.
  await renderInvoicePdf({ invoice: details[0]!, profile, appUrl, producedAt });

  let bytes = 0;
  let t0 = performance.now();
  for (let i = 0; i < COUNT; i++) {
    const pdf = await renderInvoicePdf({ invoice: details[i % details.length]!, profile, appUrl, producedAt });
    bytes += pdf.length;
  }
  const renderMs = performance.now() - t0;

  t0 = performance.now();
  for (let i = 0; i < COUNT; i++) {
    const invoice = await getDetail(db, ids[i % ids.length]!, today);
    await renderInvoicePdf({ invoice, profile, appUrl, producedAt });
  }
  const endToEndMs = performance.now() - t0;

  t0 = performance.now();
  for (let i = 0; i < COUNT; i++) invoiceDocument({ invoice: details[i % details.length]!, profile, appUrl, producedAt });
  const definitionMs = performance.now() - t0;

  const row = (label: string, ms: number) =>
    console.log(
      `  ${label.padEnd(44)} ${(ms / 1000).toFixed(2).padStart(7)} s   ${(ms / COUNT).toFixed(1).padStart(6)} ms/PDF   ${Math.round((COUNT * 1000) / ms)
        .toString()
        .padStart(5)} PDFs/s`,
    );
  row(`${COUNT} PDFs, invoices already loaded`, renderMs);
  row(`${COUNT} PDFs, read from PostgreSQL and rendered`, endToEndMs);
  console.log(`  building the ${COUNT} document definitions alone: ${definitionMs.toFixed(0)} ms`);
  console.log(`  average PDF ${(bytes / COUNT / 1024).toFixed(1)} KiB; peak memory ${peakRssMiB()} MiB`);
  reportTarget({
    name: `${COUNT} invoice PDFs, read from PostgreSQL and rendered (peak RSS ${peakRssMiB()} MiB)`,
    figure: Number((endToEndMs / 1000).toFixed(1)),
    unit: 's',
    target: 20,
    pass: atMost(endToEndMs / 1000, 20),
  });
} finally {
  await bench.drop();
}
