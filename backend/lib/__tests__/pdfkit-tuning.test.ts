import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TDocumentDefinitions } from 'pdfmake/interfaces';
import { auditDocument } from '../../modules/sanitation/audit-report-document.ts';
import { sampleAudit } from '../../modules/sanitation/audit-sample.ts';
import { pdfFont, pdfFontFiles, renderPdf } from '../pdf.ts';
import { tunePdfkit } from '../pdfkit-tuning.ts';

// The tuning changes how pdfkit works, never what it writes: the same document, laid out with it and
// without, is the same bytes.

const creationDate = new Date('2031-03-04T05:06:07Z');
const coop = { coopName: 'Quarry Lane Brewers', addressLines: ['2 Quarry Lane', 'Stonebridge'], email: 'books@quarry.example', timeZone: 'Europe/Berlin' };

/** `doc` laid out with the tuning (`on`) or without, its creation date fixed so that two layouts can be compared. */
async function layout(doc: TDocumentDefinitions, on: boolean): Promise<Buffer> {
  tunePdfkit(pdfFontFiles.normal, on);
  return renderPdf({ ...doc, info: { ...doc.info, creationDate } });
}

async function bothWays(doc: TDocumentDefinitions) {
  const plain = await layout(doc, false);
  const tuned = await layout(doc, true);
  return { plain, tuned };
}

// The first layout sets pdfmake up, the tuning included: done here, so that every switch below holds.
beforeAll(() => renderPdf({ content: ['set-up'], defaultStyle: { font: pdfFont } }));
afterAll(() => tunePdfkit(pdfFontFiles.normal, true));

describe('pdfkit tuning', () => {
  it('writes a year-long audit byte for byte as pdfkit does alone', async () => {
    const data = sampleAudit({ vesselCycles: [6, 40, 12, 0, 30, 55, 18], from: new Date('2031-01-01T00:00:00Z'), coop });
    const { plain, tuned } = await bothWays(auditDocument(data, 'every fermenter and keg'));
    expect(plain.length).toBeGreaterThan(50_000);
    expect(tuned.equals(plain)).toBe(true);
  });

  it('writes the same bytes for words the font cuts oddly: runs of spaces, tabs, signs outside Latin-1, empty lines, bold', async () => {
    const lines = [
      'two  spaces   and three',
      'a\ttab and a trailing space ',
      ' a leading space',
      '≤ 2 °C → ≥ 10 €, ½ · ‘quoted’ “twice” — dash… Ωμέγα кириллица',
      '',
      'the same words again: two  spaces   and three',
    ];
    const doc: TDocumentDefinitions = {
      defaultStyle: { font: pdfFont, fontSize: 9 },
      content: [
        ...lines.map((text) => ({ text })),
        ...lines.map((text) => ({ text, noWrap: true, bold: true })),
        { text: lines.join(' ').repeat(8) },
        { table: { body: [lines.slice(0, 3), lines.slice(3)] } },
      ],
    };
    const { plain, tuned } = await bothWays(doc);
    expect(tuned.equals(plain)).toBe(true);
  });

  it('compares bytes that tell documents apart: one character more is another file', async () => {
    const doc = (text: string): TDocumentDefinitions => ({ defaultStyle: { font: pdfFont }, content: [text] });
    const a = await layout(doc('Sanitize · 2 min'), true);
    const b = await layout(doc('Sanitize · 2 min.'), true);
    expect(a.equals(await layout(doc('Sanitize · 2 min'), false))).toBe(true);
    expect(a.equals(b)).toBe(false);
  });
});
