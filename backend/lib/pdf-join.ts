import fs from 'node:fs';
import fontkit from '@pdf-lib/fontkit';
import {
  degrees,
  drawText,
  ParseSpeeds,
  PDFContentStream,
  PDFDocument,
  type PDFFont,
  PDFHexString,
  type PDFOperator,
  popGraphicsState,
  pushGraphicsState,
  rgb,
} from 'pdf-lib';
import { pageLabel, pageNumberPlacement, type PdfDensity } from './pdf-frame.ts';
import { pdfFontFiles } from './pdf.ts';

/**
 * Joins the parts of one framed document (pdf-frame.ts, each laid out with `part` on its own render
 * thread) into one PDF, and numbers its pages over the whole: "‹reference› · Page x of y" in the frame's
 * font, size, colour and place, which the parts left out. The document info (title, author, subject)
 * is the first part's. Runs on a PDF render thread (pdf-render.ts), never on a request's.
 */

let regular: { bytes: Uint8Array; ascent: number } | null = null;
/** The font's regular style and its ascent (in ems, as pdfmake and pdfkit place a line's baseline), read once per thread. */
function regularFont() {
  if (!regular) {
    const bytes = fs.readFileSync(pdfFontFiles.normal);
    const font = fontkit.create(bytes);
    regular = { bytes, ascent: font.ascent / font.unitsPerEm };
  }
  return regular;
}

/**
 * The glyphs and width of each page's label, word by word: a word (with the space that ends it) is laid
 * out once for the document and its glyph codes and width kept, as pdfkit does for the parts' own text,
 * so 400 labels cost a few dozen lay-outs of "Page", "of" and the numbers rather than 400 of whole lines.
 * pdf-lib measures a line by its glyphs' advance widths (no kerning), so the sum of the words' is the
 * line's; no ligature or substitution spans a space.
 */
function labelEncoder(font: PDFFont) {
  const words = new Map<string, { hex: string; width: number }>();
  return (text: string, size: number) => {
    let hex = '';
    let width = 0;
    for (const word of text.match(/[^ ]* ?/g) ?? []) {
      if (!word) continue;
      let known = words.get(word);
      if (!known) {
        known = { hex: font.encodeText(word).asString(), width: font.widthOfTextAtSize(word, 1000) };
        words.set(word, known);
      }
      hex += known.hex;
      width += known.width;
    }
    return { encoded: PDFHexString.of(hex), width: (width * size) / 1000 };
  };
}

const colour = (hex: string) => rgb(...([1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255) as [number, number, number]));

export async function joinFramedParts(parts: Uint8Array[], footer: { density?: PdfDensity; reference?: string }): Promise<Uint8Array> {
  const [first, ...rest] = parts;
  if (!first) throw new Error('A joined document needs at least one part');
  // On a render thread nothing waits for a turn of the event loop: parse and write without pausing.
  const load = (pdf: Uint8Array) => PDFDocument.load(pdf, { updateMetadata: false, parseSpeed: ParseSpeeds.Fastest });
  const doc = await load(first);
  for (const part of rest) {
    const source = await load(part);
    for (const page of await doc.copyPages(source, source.getPageIndices())) doc.addPage(page);
  }

  doc.registerFontkit(fontkit);
  const { bytes, ascent } = regularFont();
  const font = await doc.embedFont(bytes, { subset: true });
  const place = pageNumberPlacement(footer.density);
  const baseline = place.top - ascent * place.fontSize;
  // A part's pages leave their coordinates turned (top-down) at the end of their content: each page's
  // content is wrapped in one saved graphics state, so the number is drawn in the page's own coordinates.
  // The streams are written as they are: a few dozen bytes a page, not worth a compressor each.
  const stream = (ops: PDFOperator[]) => doc.context.register(PDFContentStream.of(doc.context.obj({}), ops, false));
  const save = stream([pushGraphicsState()]);
  const restore = stream([popGraphicsState()]);
  const color = colour(place.color);
  const pages = doc.getPages();
  const encode = labelEncoder(font);
  pages.forEach((page, i) => {
    const { encoded, width } = encode(pageLabel(footer.reference, i + 1, pages.length), place.fontSize);
    const x = page.getWidth() - place.right - width;
    page.node.normalize();
    page.node.wrapContentStreams(save, restore);
    const key = page.node.newFontDictionary(font.name, font.ref);
    const rotation = degrees(0);
    const ops = drawText(encoded, { color, font: key, size: place.fontSize, rotate: rotation, xSkew: rotation, ySkew: rotation, x, y: baseline });
    page.node.addContentStream(stream([pushGraphicsState(), ...ops, popGraphicsState()]));
  });
  // In object streams, which keep the joined file smaller than the one-piece layout's for a few dozen ms more.
  return doc.save({ objectsPerTick: Infinity });
}
