import { renderPdfOffThread } from '../../lib/pdf-render.ts';
import { pdfFont, renderPdf } from '../../lib/pdf.ts';
import type { AuditData } from './audit-report-data.ts';
import { auditDocument } from './audit-report-document.ts';

/**
 * The sanitation audit's renderer: the data is loaded on the request's thread (audit-report-data.ts)
 * and laid out (audit-report-document.ts) on a PDF render thread (backend/lib/pdf-render.ts), so a
 * year's report does not hold up the app instance's other requests. The thread imports this module
 * (by its own URL, which is the same file in the sources and in the built server) and calls one of
 * the exports below with plain data (Dates and strings); it builds the document definition, header
 * and footer callbacks included, there. Nothing here, nor in what it imports, opens a database or
 * starts anything at import: the thread's module graph is this file, the document, the frame and pdfmake.
 */

export async function renderAuditPdf(data: AuditData, vesselSetLabel: string): Promise<Buffer> {
  return renderPdf(auditDocument(data, vesselSetLabel));
}

/** A one-line PDF, laid out in the render thread so that this module, the document, pdfmake and the font are loaded there. */
export function renderWarmUpPdf(): Promise<Buffer> {
  return renderPdf({ content: [{ text: 'Cellarwright' }], defaultStyle: { font: pdfFont } });
}

/** Starts the render thread ahead of the first audit (about 2 s of start-up otherwise paid by that request). */
export function warmAuditRenderer(): Promise<Buffer> {
  return renderPdfOffThread({ module: new URL(import.meta.url), exportName: 'renderWarmUpPdf', args: [] });
}

export function renderAuditPdfOffThread(data: AuditData, vesselSetLabel: string): Promise<Buffer> {
  return renderPdfOffThread({ module: new URL(import.meta.url), exportName: 'renderAuditPdf', args: [data, vesselSetLabel] });
}
