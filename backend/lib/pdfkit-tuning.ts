import fs from 'node:fs';
import { createRequire } from 'node:module';

/**
 * Two changes to how pdfkit (under pdfmake) does its work, not to what it writes: a document laid out with
 * them is byte for byte the one laid out without (`__tests__/pdfkit-tuning.test.ts` checks this on a
 * year's audit). Measured on half of the benchmark's year of 80 vessels, they take over a quarter off the
 * CPU time of its layout (1.56 s to 1.10–1.15 s), and 500 invoices went from 16–17 s to 14–15 s.
 *
 * - **Words encoded once.** pdfkit lays out a line word by word and keeps each word's glyphs, but then
 *   turns every glyph of every line into its code again. A year's audit draws some 40,000 lines of a few
 *   hundred distinct words; each word's codes and positions are now kept per font of the document, so a
 *   line is the codes of its words put together. The glyphs enter the font's subset in the same order
 *   (a word's the first time it is seen), so the subset and its codes are the same.
 * - **Content written once per stream.** pdfkit turns every operator of a page (a dozen for each line
 *   of text) into a Buffer of its own and joins them when the page ends; the operators are now kept as
 *   strings and turned into one Buffer then. The bytes and the stream's length are the same.
 *
 * pdfkit's classes are not exported; their prototypes are reached through a document that is never
 * ended. The version is pinned in package.json (pdfkit comes with pdfmake); a new one must pass the test.
 */

const requireHere = createRequire(import.meta.url);
const PdfKitDocument = createRequire(requireHere.resolve('pdfmake'))('pdfkit') as new (options: object) => {
  ref(): object;
  font(src: Buffer): unknown;
  _font: object;
};

type Encoded = [string[], object[]];
interface Font {
  wordCodes?: Map<string, Encoded>;
}
interface FontProto {
  encode: (this: Font, text: string, features?: unknown) => Encoded;
}
interface RefProto {
  write: (this: PendingRef, chunk: unknown) => void;
  finalize: (this: PendingRef) => void;
}
interface PendingRef {
  pending?: string[];
  compress: boolean;
  data: { Length?: number; Filter?: string };
}

let restore: (() => void) | null = null;

/** Switches the tuning on (the default) or off again, for the whole thread. `fontFile`: any TrueType font, to reach pdfkit's font class. */
export function tunePdfkit(fontFile: string, on = true): void {
  if (on && !restore) restore = apply(fontFile);
  else if (!on && restore) {
    restore();
    restore = null;
  }
}

function apply(fontFile: string): () => void {
  const doc = new PdfKitDocument({ autoFirstPage: false });
  const refProto = Object.getPrototypeOf(doc.ref()) as RefProto;
  doc.font(fs.readFileSync(fontFile));
  const fontProto = Object.getPrototypeOf(doc._font) as FontProto;
  const { encode } = fontProto;
  const { write, finalize } = refProto;

  fontProto.encode = function (text, features) {
    if (features) return encode.call(this, text, features);
    const words = (this.wordCodes ??= new Map<string, Encoded>());
    const codes: string[] = [];
    const positions: object[] = [];
    // The words as pdfkit's layout cuts them: each ends with the space or tab after it, the last with the text.
    let last = 0;
    for (let i = 0; i <= text.length; i++) {
      const end = i === text.length;
      if (end ? last < i : text[i] === ' ' || text[i] === '\t') {
        const word = text.slice(last, i + 1);
        let known = words.get(word);
        if (!known) {
          known = encode.call(this, word);
          words.set(word, known);
        }
        for (const c of known[0]) codes.push(c);
        for (const p of known[1]) positions.push(p);
        last = i + 1;
      }
    }
    return [codes, positions];
  };

  const flush = (ref: PendingRef) => {
    if (!ref.pending?.length) return;
    const lines = ref.pending;
    ref.pending = [];
    // As pdfkit writes each: the string's characters as bytes (latin1), each followed by a line feed.
    const bytes = Buffer.from(`${lines.join('\n')}\n`, 'binary');
    const length = ref.data.Length;
    write.call(ref, bytes);
    ref.data.Length = length;
  };
  refProto.write = function (chunk) {
    if (chunk instanceof Uint8Array) {
      flush(this);
      write.call(this, chunk);
      return;
    }
    const line = `${chunk as string}`;
    (this.pending ??= []).push(line);
    this.data.Length = (this.data.Length ?? 0) + line.length + 1;
    if (this.compress) this.data.Filter = 'FlateDecode';
  };
  refProto.finalize = function () {
    flush(this);
    finalize.call(this);
  };

  return () => {
    fontProto.encode = encode;
    refProto.write = write;
    refProto.finalize = finalize;
  };
}
