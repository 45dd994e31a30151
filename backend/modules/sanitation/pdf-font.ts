import fs from 'node:fs';
import { inflateSync } from 'node:zlib';

/**
 * Roboto Flex for PDFs as a TrueType buffer, unpacked once from the shipped WOFF (WOFF 1.0:
 * zlib-compressed sfnt tables). pdfmake embeds WOFF too, but unpacks it with a JavaScript
 * inflater on every document; a long report is noticeably faster from the TrueType form.
 */
export function woffToTtf(woff: Buffer): Buffer {
  if (woff.toString('latin1', 0, 4) !== 'wOFF') throw new Error('not a WOFF 1.0 font');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables: { tag: number; checksum: number; data: Buffer }[] = [];
  for (let i = 0; i < numTables; i++) {
    const at = 44 + i * 20;
    const tag = woff.readUInt32BE(at);
    const offset = woff.readUInt32BE(at + 4);
    const compLength = woff.readUInt32BE(at + 8);
    const origLength = woff.readUInt32BE(at + 12);
    const checksum = woff.readUInt32BE(at + 16);
    const raw = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(raw) : Buffer.from(raw);
    if (data.length !== origLength) throw new Error('WOFF table length mismatch');
    tables.push({ tag, checksum, data });
  }
  let entrySelector = 0;
  while (2 ** (entrySelector + 1) <= numTables) entrySelector++;
  const searchRange = 2 ** entrySelector * 16;
  const headerSize = 12 + numTables * 16;
  const padded = (n: number) => (n + 3) & ~3;
  const total = headerSize + tables.reduce((s, t) => s + padded(t.data.length), 0);
  const out = Buffer.alloc(total);
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(searchRange, 6);
  out.writeUInt16BE(entrySelector, 8);
  out.writeUInt16BE(numTables * 16 - searchRange, 10);
  let offset = headerSize;
  tables.forEach((t, i) => {
    const rec = 12 + i * 16;
    out.writeUInt32BE(t.tag, rec);
    out.writeUInt32BE(t.checksum, rec + 4);
    out.writeUInt32BE(offset, rec + 8);
    out.writeUInt32BE(t.data.length, rec + 12);
    t.data.copy(out, offset);
    offset += padded(t.data.length);
  });
  return out;
}

const cache = new Map<string, Buffer>();
export function ttfFromWoffFile(file: string): Buffer {
  let ttf = cache.get(file);
  if (!ttf) {
    ttf = woffToTtf(fs.readFileSync(file));
    cache.set(file, ttf);
  }
  return ttf;
}
