import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pdfText } from '../../../../tests/helpers/pdf.ts';
import { PdfRenderError, PdfRenderPool } from '../../../lib/pdf-render.ts';
import type { AuditCycle, AuditData, AuditVessel } from '../audit-report-data.ts';
import { renderAuditPdfOffThread, splitVessels, warmAuditRenderer } from '../audit-report.ts';
import { sampleAudit } from '../audit-sample.ts';

// A long audit is laid out in parts on several render threads and joined: it must read as the same
// document laid out in one piece, its pages numbered over the whole.

const from = new Date('2031-01-01T00:00:00Z');
const coop = { coopName: 'Quarry Lane Brewers', addressLines: ['2 Quarry Lane', 'Stonebridge'], email: 'books@quarry.example', timeZone: 'Europe/Berlin' };
const runningHeader = 'Quarry Lane Brewers · Sanitation audit 1 Jan 2031 to 31 Dec 2031';

/** Seven vessels of different lengths: fermenters with cycles, kegs with cycles and fills, one vessel with nothing in the period. */
const auditOf = (): AuditData => sampleAudit({ vesselCycles: [6, 40, 12, 0, 30, 55, 18], from, coop });

const label = 'every fermenter and keg';
const headingOf = (v: AuditVessel) => `${v.code} · ${v.name}`;
const flat = (line: string) => line.trim().replace(/\s+/g, ' ');
const pagesOf = (pdf: Buffer) => pdfText(pdf).split('\f').slice(0, -1);
const footerLine = /· produced .* by Cellarwright/;

/**
 * The document's text without what belongs to a page rather than to the document (the running header,
 * the footer, the heading and column rows a table repeats atop each page it runs onto), one line per
 * line of text: the same for the same document however its pages fall.
 */
function documentText(pdf: Buffer, data: AuditData): string[] {
  const headings = new Set(data.vessels.flatMap((v) => [headingOf(v), `${v.code} · fills`]).concat('Exceptions'));
  const lines = pagesOf(pdf)
    .flatMap((page) => page.split('\n'))
    .map(flat)
    .filter((l) => l && l !== runningHeader && !footerLine.test(l));
  const kept: string[] = [];
  let lastHeading = '';
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i]!;
    if (headings.has(line)) {
      // A heading seen just before is its table's header row repeated on a new page: it and the column row go.
      if (line === lastHeading) {
        i += 1;
        continue;
      }
      lastHeading = line;
    }
    kept.push(line);
  }
  return kept;
}

/** The box pdftotext gives the first "Page" word of page `page`. */
function pageWordBox(pdf: Buffer, page: number) {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'cw-bbox-')), 'doc.pdf');
  fs.writeFileSync(file, pdf);
  const html = execFileSync('/usr/bin/pdftotext', ['-bbox', '-f', String(page), '-l', String(page), file, '-'], { encoding: 'utf8' });
  fs.rmSync(path.dirname(file), { recursive: true, force: true });
  const m =
    /<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">Page<\/word>\s*<word [^>]*>\d+<\/word>\s*<word [^>]*>of<\/word>\s*<word [^>]*xMax="([\d.]+)"/.exec(
      html,
    );
  if (!m) throw new Error(`no page number on page ${page}`);
  return { yMin: Number(m[2]), yMax: Number(m[4]), right: Number(m[5]) };
}

describe('the sanitation audit in parts', () => {
  const pool = new PdfRenderPool({ size: 3 });
  const started: string[] = [];
  pool.events.on('start', ({ exportName }: { exportName: string }) => started.push(exportName));
  const data = auditOf();
  let whole: Buffer;
  let joined: Buffer;

  beforeAll(async () => {
    started.length = 0;
    whole = await renderAuditPdfOffThread(data, label, { pool });
    expect(started).toEqual(['renderAuditPdf']);
    started.length = 0;
    joined = await renderAuditPdfOffThread(data, label, { pool, rowsPerPart: 10 });
    expect(started).toEqual(['renderAuditPdf', 'renderAuditPdf', 'renderAuditPdf', 'joinAuditParts']);
  }, 90_000);
  afterAll(() => pool.close());

  it('numbers the pages over the whole joined document, with no part numbering its own', () => {
    const pages = pagesOf(joined);
    const n = pages.length;
    expect(n).toBeGreaterThan(3);
    pages.forEach((page, i) => {
      expect(page.match(/Page \d+ of \d+/g)).toEqual([`Page ${i + 1} of ${n}`]);
      expect(page).toContain('Quarry Lane Brewers · produced 2 Jan 2032, 10:30 (Europe/Berlin) by Cellarwright');
      // The running header atop every page but the first, whichever part the page came from.
      expect(page.includes(runningHeader)).toBe(i > 0);
    });
  });

  it('stamps the page number where the frame prints it, in the same size', () => {
    const frame = pageWordBox(whole, 2);
    const stamped = pageWordBox(joined, 2);
    expect(Math.abs(stamped.yMin - frame.yMin)).toBeLessThan(0.1);
    expect(Math.abs(stamped.yMax - frame.yMax)).toBeLessThan(0.1);
    expect(Math.abs(stamped.right - frame.right)).toBeLessThan(0.1);
  });

  it('has the letterhead, summary and cautions once, and each vessel once and in order', () => {
    const text = pdfText(joined, { flat: true });
    for (const once of ['2 Quarry Lane', 'Rules in force', 'Summary by vessel', 'Safety cautions', '7 vessels · 161 cycles'])
      expect(text.split(once)).toHaveLength(2);
    const pages = pagesOf(joined);
    expect(pages.at(-1)).toContain('Safety cautions');
    let previous = -1;
    for (const v of data.vessels) {
      const on = pages.flatMap((page, i) => (page.split('\n').some((l) => flat(l) === headingOf(v)) ? [i] : []));
      // Its heading comes back atop each page its table runs onto: a run of pages, after the vessel before.
      expect(on.length).toBeGreaterThan(0);
      expect(on).toEqual(on.map((_, k) => on[0]! + k));
      expect(on[0]).toBeGreaterThanOrEqual(previous);
      previous = on.at(-1)!;
    }
  });

  it('reads as the same document laid out in one piece', () => {
    expect(pagesOf(whole).join('')).toMatch(/Page 1 of \d+/);
    const one = documentText(whole, data);
    expect(one.length).toBeGreaterThan(200);
    expect(documentText(joined, data)).toEqual(one);
    expect(pdfText(joined).replace(/\s+/g, ' ')).toContain('K-006 · 19 L keg 6');
  });

  it('keeps the document info of the whole', () => {
    const info = execFileSync('/usr/bin/pdfinfo', ['-'], { input: joined, encoding: 'utf8' });
    expect(info).toMatch(/Title:\s+Sanitation audit — Quarry Lane Brewers/);
    expect(info).toMatch(/Subject:\s+Sanitation audit 1 Jan 2031 to 31 Dec 2031/);
  });

  it('fails the whole report when one part fails', async () => {
    const broken = auditOf();
    // A step the layout cannot read, in the last vessel: only the last part fails.
    broken.vessels[6]!.cycles[3]!.steps[1] = null as unknown as AuditCycle['steps'][number];
    await expect(renderAuditPdfOffThread(broken, label, { pool, rowsPerPart: 10 })).rejects.toBeInstanceOf(PdfRenderError);
  });
});

describe('splitting the vessels', () => {
  it('keeps their order and balances the parts by rows', () => {
    const data = auditOf();
    const rows = (vs: AuditVessel[]) => vs.reduce((n, v) => n + 1 + v.cycles.length * 5 + v.fills.length, 0);
    const runs = splitVessels(data, 2);
    expect(runs).toHaveLength(2);
    expect(runs.flat()).toEqual(data.vessels);
    const share = (rows(data.vessels) + data.vessels.length + data.exceptions.length) / 2;
    const largest = Math.max(...data.vessels.map((v) => rows([v])));
    expect(Math.abs(rows(runs[1]!) - share)).toBeLessThan(largest);
    expect(splitVessels(data, 1)).toEqual([data.vessels]);
    expect(splitVessels(data, 3).flat()).toEqual(data.vessels);
  });
});

describe('the render pool', () => {
  it('has at least two threads by default, and the warm-up starts them all', async () => {
    const pool = new PdfRenderPool();
    expect(pool.threads).toBeGreaterThanOrEqual(2);
    let running = 0;
    let most = 0;
    pool.events.on('start', () => (most = Math.max(most, ++running)));
    pool.events.on('done', () => (running -= 1));
    try {
      const pdf = await warmAuditRenderer(pool);
      expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
      expect(most).toBe(pool.threads);
    } finally {
      await pool.close();
    }
  }, 60_000);
});
