import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import type { TDocumentDefinitions } from 'pdfmake/interfaces';
import { tunePdfkit } from './pdfkit-tuning.ts';

const require = createRequire(import.meta.url);
// pdfmake 0.3's server build is one shared instance per thread; it embeds TTF or WOFF (not WOFF2).
const pdfmake = require('pdfmake') as {
  virtualfs: { writeFileSync(name: string, data: Buffer): void; existsSync(name: string): boolean };
  setFonts(fonts: Record<string, Record<string, string>>): void;
  setUrlAccessPolicy(cb: (url: string) => boolean): void;
  setLocalAccessPolicy(cb: (path: string) => boolean): void;
  createPdf(doc: TDocumentDefinitions): { getBuffer(): Promise<Buffer> };
};

const fontDir = path.join(path.dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf');
/**
 * DejaVu Sans Condensed as shipped in TrueType (free licence, see the package): Latin with Latin
 * Extended-A/B, Greek and Cyrillic, the typographic marks (– — › ‘ ’ “ ” …), arrows and maths signs
 * (→ ≤ ≥ ±), °, € and the other currency signs, in a real bold and oblique. pdfmake embeds the
 * subset of glyphs each document uses.
 */
const fontFiles = {
  normal: 'DejaVuSansCondensed.ttf',
  bold: 'DejaVuSansCondensed-Bold.ttf',
  italics: 'DejaVuSansCondensed-Oblique.ttf',
  bolditalics: 'DejaVuSansCondensed-BoldOblique.ttf',
} as const;

/** The font family every Cellarwright PDF uses (`defaultStyle: { font: pdfFont }`). */
export const pdfFont = 'DejaVuSansCondensed';

/** The TrueType file of each style, for checks of what a PDF can print. */
export const pdfFontFiles = Object.fromEntries(Object.entries(fontFiles).map(([style, file]) => [style, path.join(fontDir, file)])) as Record<
  keyof typeof fontFiles,
  string
>;

let configured = false;
function configure() {
  if (configured) return;
  // Read once into pdfmake's virtual file system: no document reads a file or fetches anything.
  const virtual = Object.fromEntries(
    Object.entries(pdfFontFiles).map(([style, file]) => {
      const name = `cellarwright-${path.basename(file)}`;
      if (!pdfmake.virtualfs.existsSync(name)) pdfmake.virtualfs.writeFileSync(name, fs.readFileSync(file));
      return [style, name];
    }),
  );
  pdfmake.setFonts({ [pdfFont]: virtual });
  pdfmake.setUrlAccessPolicy(() => false);
  pdfmake.setLocalAccessPolicy(() => false);
  tunePdfkit(pdfFontFiles.normal);
  configured = true;
}

/** Lays out a pdfmake document with the product's font and access policies. */
export function renderPdf(doc: TDocumentDefinitions): Promise<Buffer> {
  configure();
  return pdfmake.createPdf(doc).getBuffer();
}

/**
 * `pageBreakBefore` for documents whose headings carry `headlineLevel`: a heading that would be the
 * last thing on its page moves to the next page with what it heads, so no page ends on a title.
 */
// pdfmake 0.3 calls it as (nodeInfo, { getFollowingNodesOnPage, … }); the published types still describe 0.2's arguments.
export const keepHeadingsWithNext = ((node: { headlineLevel?: number }, pages: { getFollowingNodesOnPage(): unknown[] }) =>
  Boolean(node.headlineLevel) && pages.getFollowingNodesOnPage().length === 0) as unknown as NonNullable<TDocumentDefinitions['pageBreakBefore']>;
