import { pdfRenderPool, type PdfRenderPool } from '../../lib/pdf-render.ts';
import { renderPdf } from '../../lib/pdf.ts';
import type { AuditData, AuditVessel } from './audit-report-data.ts';
import { auditDocument, vesselSummary, type AuditPart } from './audit-report-document.ts';
import { sampleAudit } from './audit-sample.ts';

/**
 * The sanitation audit's renderer: the data is loaded on the request's thread (audit-report-data.ts)
 * and laid out (audit-report-document.ts) on PDF render threads (backend/lib/pdf-render.ts), so a
 * year's report does not hold up the app instance's other requests. A long report is laid out in parts,
 * one per thread at once, each a run of vessels balanced by their rows (cycles, steps and fills), then
 * joined on a thread, its pages numbered over the whole (backend/lib/pdf-join.ts); a short one is one
 * part. The thread imports this module (by its own URL, which is the same file in the sources and in the
 * built server) and calls one of the exports below with plain data (Dates and strings); it builds the
 * document definition, header and footer callbacks included, there. Nothing here, nor in what it
 * imports, opens a database or starts anything at import: the thread's module graph is this file, the
 * document, the frame and pdfmake (and the join's pdf-lib, loaded there when first needed).
 */

/** Rows (cycles, steps and fills) below which a part is not worth a thread of its own: a report under twice this is one part. */
export const AUDIT_ROWS_PER_PART = 2500;

/** The audit, or one part of it (`part`), laid out. */
export async function renderAuditPdf(data: AuditData, vesselSetLabel: string, part?: AuditPart): Promise<Buffer> {
  return renderPdf(auditDocument(data, vesselSetLabel, part));
}

/** The parts joined into one PDF, "Page x of y" stamped over the whole, as the frame prints it. */
export async function joinAuditParts(parts: Uint8Array[]): Promise<Uint8Array> {
  const { joinFramedParts } = await import('../../lib/pdf-join.ts');
  return joinFramedParts(parts, { density: 'report' });
}

/**
 * A made-up year of four vessels (audit-sample.ts), laid out in two parts in the render thread and joined
 * there, so that this module, the document, pdfmake, pdf-lib and the font are loaded and the layout's code
 * compiled before the first report needs them: a thread's first long report took 1.7 times as long as its
 * third without this.
 */
export async function renderWarmUpPdf(): Promise<Buffer> {
  const data = sampleAudit({ vesselCycles: Array.from({ length: 8 }, () => 150), from: new Date(Date.UTC(2000, 0, 1)), coop: warmUpCoop });
  const laid = await Promise.all(auditParts(data, splitVessels(data, 2)).map(({ data: d, part }) => renderAuditPdf(d, 'every fermenter and keg', part)));
  return Buffer.from(await joinAuditParts(laid));
}

const warmUpCoop = { coopName: 'Cellarwright', addressLines: [], email: 'cellar@example.org', timeZone: 'UTC' };

/**
 * Starts every render thread ahead of the first audit (about 2 s of start-up otherwise paid by that
 * request) and has each lay out the made-up year `rounds` times. A thread keeps getting faster over its
 * first few reports, each a new document whose fonts and layout objects the compiled code has not yet
 * seen: laying out half of a made-up year of 80 vessels again and again on one thread, the compiler still
 * gave up on optimized code some 95 times in the first layout, 55 in the second, 24 in the third and none
 * by the sixth, and the layout took 1.6, 1.2, 1.1 and then 0.9–1.0 s. On the 2-core benchmark machine,
 * three rounds on a pool of two threads took 6.4–9.5 s from start, the threads' own start included.
 */
export async function warmAuditRenderer(pool: PdfRenderPool = pdfRenderPool, rounds = 1): Promise<Buffer> {
  const job = { module: new URL(import.meta.url), exportName: 'renderWarmUpPdf', args: [] };
  let pdf = await pool.warm(job);
  for (let round = 1; round < rounds; round++) pdf = await pool.warm(job);
  return pdf;
}

const rowsOf = (v: AuditVessel) => 1 + v.cycles.length + v.cycles.reduce((n, c) => n + c.steps.length, 0) + v.fills.length;

/**
 * The vessels in at most `parts` runs, in order, balanced by rows: each run ends at the vessel whose
 * running total of rows comes nearest the run's share. The first part also lays out the summary and the
 * exceptions, counted as rows of its own.
 */
export function splitVessels(data: AuditData, parts: number): AuditVessel[][] {
  const weights = data.vessels.map(rowsOf);
  weights[0] = (weights[0] ?? 0) + data.vessels.length + data.exceptions.length;
  const total = weights.reduce((a, b) => a + b, 0);
  const runs: AuditVessel[][] = [];
  let start = 0;
  let sum = 0;
  for (let i = 0; i < weights.length; i++) {
    const share = (total * (runs.length + 1)) / parts;
    const before = sum;
    sum += weights[i]!;
    if (runs.length === parts - 1 || sum < share) continue;
    // End this run before or after vessel i, whichever comes nearer its share; never empty.
    const end = share - before < sum - share && i > start ? i : i + 1;
    runs.push(data.vessels.slice(start, end));
    start = end;
  }
  if (start < data.vessels.length || runs.length === 0) runs.push(data.vessels.slice(start));
  return runs;
}

/** What each of `runs` (splitVessels) lays out: its vessels, and for the first the summary of all and the exceptions. */
export function auditParts(data: AuditData, runs: AuditVessel[][]): { data: AuditData; part: AuditPart }[] {
  const summary = data.vessels.map(vesselSummary);
  return runs.map((vessels, i) => {
    const first = i === 0;
    return {
      data: { ...data, vessels, exceptions: first ? data.exceptions : [] },
      part: { first, last: i === runs.length - 1, summary: first ? summary : [] },
    };
  });
}

/**
 * Lays out the audit on the render pool: in one part when its rows are few (under twice `rowsPerPart`),
 * else in as many parts as the pool has threads (fewer when the rows are fewer), joined on a thread. A
 * part that fails fails the whole report.
 */
export async function renderAuditPdfOffThread(
  data: AuditData,
  vesselSetLabel: string,
  { rowsPerPart = AUDIT_ROWS_PER_PART, pool = pdfRenderPool }: { rowsPerPart?: number; pool?: PdfRenderPool } = {},
): Promise<Buffer> {
  const module = new URL(import.meta.url);
  const rows = data.vessels.reduce((n, v) => n + rowsOf(v), 0);
  const runs = splitVessels(data, Math.max(1, Math.min(pool.threads, Math.floor(rows / rowsPerPart))));
  if (runs.length === 1) return pool.render({ module, exportName: 'renderAuditPdf', args: [data, vesselSetLabel] });
  const parts = await Promise.all(
    auditParts(data, runs).map(({ data: partData, part }) => pool.render({ module, exportName: 'renderAuditPdf', args: [partData, vesselSetLabel, part] })),
  );
  return pool.render({ module, exportName: 'joinAuditParts', args: [parts] });
}
