import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { TDocumentDefinitions } from 'pdfmake/interfaces';
import { trueTypeFromWoffFile } from './pdf-font.ts';

const require = createRequire(import.meta.url);
// pdfmake 0.3's server build is one shared instance per thread; it embeds TTF or WOFF (not WOFF2).
const pdfmake = require('pdfmake') as {
  virtualfs: { writeFileSync(name: string, data: Buffer): void; existsSync(name: string): boolean };
  setFonts(fonts: Record<string, Record<string, string>>): void;
  setUrlAccessPolicy(cb: (url: string) => boolean): void;
  setLocalAccessPolicy(cb: (path: string) => boolean): void;
  createPdf(doc: TDocumentDefinitions): { getBuffer(): Promise<Buffer> };
};

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const fontDir = path.join(root, 'node_modules', '@fontsource', 'roboto-flex', 'files');
const fontFile = path.join(fontDir, 'roboto-flex-latin-400-normal.woff');
const virtualFont = 'cellarwright-roboto-flex-latin-400.ttf';

/** The font family every Cellarwright PDF uses (`defaultStyle: { font: pdfFont }`). */
export const pdfFont = 'RobotoFlex';

let configured = false;
function configure() {
  if (configured) return;
  // The shipped Roboto Flex, unpacked to TrueType once: pdfmake then skips re-inflating it per document.
  pdfmake.virtualfs.writeFileSync(virtualFont, trueTypeFromWoffFile(fontFile));
  pdfmake.setFonts({ [pdfFont]: { normal: virtualFont, bold: virtualFont, italics: virtualFont, bolditalics: virtualFont } });
  // A PDF of ours never fetches anything and reads only the font files.
  pdfmake.setUrlAccessPolicy(() => false);
  pdfmake.setLocalAccessPolicy((p) => path.resolve(p).startsWith(fontDir));
  configured = true;
}

/** Lays out a pdfmake document with the product's font and access policies. */
export function renderPdf(doc: TDocumentDefinitions): Promise<Buffer> {
  configure();
  return pdfmake.createPdf(doc).getBuffer();
}
