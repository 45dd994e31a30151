import fs from 'node:fs';
import { inflateSync } from 'node:zlib';

/**
 * The shipped Roboto Flex WOFF (1.0: zlib-compressed sfnt tables) unpacked once into TrueType.
 * pdfmake embeds WOFF as it is, but then inflates every table again for each document; from the
 * TrueType form a one-page invoice renders several times faster (see backend/bench/invoice-pdfs).
 */
export function woffToTrueType(woff: Buffer): Buffer {
  if (woff.toString('latin1', 0, 4) !== 'wOFF') throw new Error('not a WOFF 1.0 font');
  const numTables = woff.readUInt16BE(12);
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + i * 20;
    const [tag, offset, compressed, length, checksum] = [0, 4, 8, 12, 16].map((d) => woff.readUInt32BE(at + d)) as [number, number, number, number, number];
    const raw = woff.subarray(offset, offset + compressed);
    const data = compressed < length ? inflateSync(raw) : Buffer.from(raw);
    if (data.length !== length) throw new Error('WOFF table length mismatch');
    return { tag, checksum, data };
  });
  let selector = 0;
  while (2 ** (selector + 1) <= numTables) selector++;
  const range = 2 ** selector * 16;
  const pad = (n: number) => (n + 3) & ~3;
  const header = 12 + numTables * 16;
  const out = Buffer.alloc(header + tables.reduce((s, t) => s + pad(t.data.length), 0));
  out.writeUInt32BE(woff.readUInt32BE(4), 0); // the sfnt flavour
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(range, 6);
  out.writeUInt16BE(selector, 8);
  out.writeUInt16BE(numTables * 16 - range, 10);
  let offset = header;
  tables.forEach((t, i) => {
    out.writeUInt32BE(t.tag, 12 + i * 16);
    out.writeUInt32BE(t.checksum, 16 + i * 16);
    out.writeUInt32BE(offset, 20 + i * 16);
    out.writeUInt32BE(t.data.length, 24 + i * 16);
    t.data.copy(out, offset);
    offset += pad(t.data.length);
  });
  return out;
}

let cached: Buffer | null = null;
export function trueTypeFromWoffFile(file: string): Buffer {
  cached ??= woffToTrueType(fs.readFileSync(file));
  return cached;
}
