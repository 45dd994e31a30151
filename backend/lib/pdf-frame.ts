import type { Content, PageOrientation, TDocumentDefinitions } from 'pdfmake/interfaces';
import { deferToLocalCodes } from '../../shared/cellar/cautions.ts';
import { defaultLocale, formatDateTime } from '../../shared/format/index.ts';
import type { BillingProfile } from '../../shared/schemas/billing.ts';
import { keepHeadingsWithNext, pdfFont } from './pdf.ts';

/**
 * The one frame of every Cellarwright PDF (invoices, credit notes, the sanitation audit, the trace,
 * equipment labels): the co-op's letterhead, a footer with when the document was produced and
 * "Page x of y", the safety cautions block, and the font and document info. Who the co-op is comes
 * from `coopProfile()` in the settings service; when the document was produced from the app's clock.
 * Everything here is plain data or pure functions, so a document can be laid out on a PDF render
 * thread (pdf-render.ts) as well as on the request's own.
 */

/** The document palette. */
export const pdfColours = {
  ink: '#1d1b18',
  muted: '#5c564d',
  copper: '#8f4520',
  danger: '#b42318',
  hop: '#4b5a26',
  rule: '#c9bca8',
} as const;

/** Who the co-op is, as its documents name it (a `CoopProfile` from the settings service will do). */
export type PdfCoop = Pick<BillingProfile, 'coopName' | 'addressLines' | 'email'> & { timeZone: string };

/** A letter (invoice, credit note) in 10 pt, or a report (audit, trace) in 8 pt with narrower margins. */
export type PdfDensity = 'letter' | 'report';

const densities = {
  letter: { margins: [48, 48, 48, 56], fontSize: 10, lineHeight: 1.15, footerSize: 8, footerMargin: [48, 16, 48, 0] },
  report: { margins: [36, 40, 36, 40], fontSize: 8, lineHeight: 1.1, footerSize: 7, footerMargin: [36, 10, 36, 0] },
} as const;

export interface PdfFrame {
  coop: PdfCoop;
  /** The document's name: in the letterhead, the document info and the running header. */
  title: string;
  /** Lines under the title in the letterhead (a status, what the document replaces). */
  marks?: string[];
  /** What the footer names beside the page number (an invoice's number). */
  reference?: string;
  /** When the document was produced (the app's clock), printed in the footer in the co-op's time zone. */
  producedAt: Date;
  density?: PdfDensity;
  pageOrientation?: PageOrientation;
  /** A line atop every page after the first (long reports). */
  runningHeader?: string;
  /**
   * Move a heading (`headlineLevel`) that would end a page to the next (default). A long report whose
   * headings sit in their tables' header rows turns it off: pdfmake's pass looks at every node again.
   */
  keepHeadingsWithNext?: boolean;
  /** The safety cautions that close the document, kept together on one page. */
  cautions?: readonly string[];
  subject?: string;
  watermark?: TDocumentDefinitions['watermark'];
  /**
   * Set when this document is one part of a longer one, laid out in parts on several render threads and
   * joined (pdf-join.ts): the letterhead only in the first part, the cautions only in the last, the running
   * header on every page but the whole document's first, and no page numbers in the footer (the join
   * stamps "Page x of y" over the whole document, `pageNumberPlacement`).
   */
  part?: PdfPart;
  content: Content[];
}

/** Which end of the whole document a part holds (a document laid out in one piece is both). */
export interface PdfPart {
  first: boolean;
  last: boolean;
}

/** A4's width in points, portrait or landscape. */
const a4Width = { portrait: 595.28, landscape: 841.89 } as const;

/**
 * Whether a line of `text` in `fontSize` certainly fits `width` points: in the font, no character of
 * Latin-1 and Latin Extended-A is wider than 0.96 em and none of the rest wider than 1.6 em. Such a
 * line is laid out as one piece instead of word by word, which is most of the cost of a running
 * header repeated on every page of a long report.
 */
function fitsOneLine(text: string, fontSize: number, width: number): boolean {
  return widestLine(text, fontSize) <= width;
}

/** The most a line of `text` in `fontSize` can measure in the font, in points (see `fitsOneLine`). */
function widestLine(text: string, fontSize: number): number {
  let ems = 0;
  for (const ch of text) ems += ch.codePointAt(0)! < 0x180 ? 0.96 : 1.6;
  return ems * fontSize;
}

/** The footer's page number: "‹reference› · Page x of y". */
export function pageLabel(reference: string | undefined, page: number, pages: number): string {
  return `${reference ? `${reference} · ` : ''}Page ${page} of ${pages}`;
}

/**
 * Where the footer prints its page number, for stamping it on a joined document (pdf-join.ts) as the
 * frame lays it out: right-aligned to the footer's right margin, the top of its line `top` points above
 * the page's bottom edge (pdfmake sets a line's first baseline at the font's ascent below that top).
 */
export function pageNumberPlacement(density: PdfDensity = 'letter') {
  const d = densities[density];
  return { fontSize: d.footerSize, color: pdfColours.muted, right: d.footerMargin[2], top: d.margins[3] - d.footerMargin[1] };
}

/** "4 Dec 2026, 10:00 (Europe/Berlin)": when a document was produced, in the co-op's time zone. */
export function producedLabel(producedAt: Date, timeZone: string): string {
  return `${formatDateTime(producedAt, { locale: defaultLocale, timeZone })} (${timeZone})`;
}

/** The document info and type every Cellarwright PDF carries (label sheets, which have no room for a letterhead, use it alone). */
export function pdfBase(coop: PdfCoop, title: string, density: PdfDensity = 'letter'): Pick<TDocumentDefinitions, 'info' | 'defaultStyle' | 'pageSize'> {
  const d = densities[density];
  return {
    pageSize: 'A4',
    info: { title: `${title} — ${coop.coopName}`, author: coop.coopName, creator: 'Cellarwright' },
    defaultStyle: { font: pdfFont, fontSize: d.fontSize, color: pdfColours.ink, lineHeight: d.lineHeight },
  };
}

/** The co-op's name, address and e-mail on the left, the document's title (and its marks) on the right. */
export function letterhead(coop: PdfCoop, title: string, marks: string[] = []): Content {
  return {
    columns: [
      {
        width: '*',
        stack: [
          { text: coop.coopName, fontSize: 16, color: pdfColours.copper },
          ...coop.addressLines.map((l) => ({ text: l, color: pdfColours.muted, fontSize: 9 })),
          { text: coop.email, color: pdfColours.muted, fontSize: 9 },
        ],
      },
      {
        width: 'auto',
        stack: [
          { text: title, fontSize: 22, alignment: 'right' },
          ...marks.map((m) => ({ text: m, fontSize: 9, alignment: 'right' as const, color: pdfColours.copper })),
        ],
      },
    ],
  };
}

/** "Safety cautions", the list, and the note that local codes govern: one block, never split over two pages. */
export function cautionsBlock(cautions: readonly string[]): Content {
  return {
    stack: [
      { text: 'Safety cautions', fontSize: 12, color: pdfColours.danger, margin: [0, 16, 0, 4] },
      { ul: [...cautions], color: pdfColours.ink },
      { text: deferToLocalCodes, color: pdfColours.muted, margin: [0, 4, 0, 0] },
    ],
    unbreakable: true,
  };
}

/** A whole document in the frame: letterhead, the content, the cautions, and the footer on every page. */
export function framedDocument(frame: PdfFrame): TDocumentDefinitions {
  const d = densities[frame.density ?? 'letter'];
  const produced = `${frame.coop.coopName} · produced ${producedLabel(frame.producedAt, frame.coop.timeZone)} by Cellarwright`;
  const base = pdfBase(frame.coop, frame.title, frame.density);
  const running = frame.runningHeader;
  const orientation = frame.pageOrientation ?? 'portrait';
  const runningOneLine = running ? fitsOneLine(running, d.footerSize, a4Width[orientation] - d.margins[0] - d.margins[2]) : false;
  const part = frame.part ?? { first: true, last: true };
  const numbered = !frame.part;
  return {
    ...base,
    info: { ...base.info, ...(frame.subject ? { subject: frame.subject } : {}) },
    pageOrientation: orientation,
    pageMargins: [...d.margins],
    ...(frame.keepHeadingsWithNext === false ? {} : { pageBreakBefore: keepHeadingsWithNext }),
    ...(frame.watermark ? { watermark: frame.watermark } : {}),
    ...(running
      ? {
          header: (page: number): Content =>
            page === 1 && part.first
              ? { text: '' }
              : { text: running, noWrap: runningOneLine, fontSize: d.footerSize, color: pdfColours.muted, margin: [d.margins[0], 20, d.margins[2], 0] },
        }
      : {}),
    footer: (page: number, pages: number): Content => ({
      margin: [...d.footerMargin],
      columns: [
        { text: produced, color: pdfColours.muted, fontSize: d.footerSize },
        numbered
          ? {
              text: pageLabel(frame.reference, page, pages),
              color: pdfColours.muted,
              fontSize: d.footerSize,
              alignment: 'right',
              width: 'auto',
              noWrap: true,
            }
          : // The room the number stamped after the join may take, so the produced line never runs under it.
            { text: '', width: widestLine(pageLabel(frame.reference, 9999, 9999), d.footerSize) },
      ],
    }),
    content: [
      ...(part.first ? [letterhead(frame.coop, frame.title, frame.marks)] : []),
      ...frame.content,
      ...(frame.cautions && part.last ? [cautionsBlock(frame.cautions)] : []),
    ],
  };
}
