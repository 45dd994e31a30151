import zlib from 'node:zlib';

/** A minimal ZIP writer for tests that need archives no spreadsheet program would write. */

export interface ZipInput {
  name: string;
  data: Buffer;
  /** Deflate the data (default) or store it. */
  deflate?: boolean;
  /** Bytes to use as the packed data instead of packing `data` (a damaged entry). */
  packed?: Buffer;
  /** Write the entry but leave it out of the central directory. */
  unlisted?: boolean;
}

const crcTable = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k += 1) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

export function crc32(buf: Buffer): number {
  let c = 0xffffffff;
  for (const b of buf) c = crcTable[(c ^ b) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** A little-endian field of a header: [width in bytes, value, offset]. */
type Field = [2 | 4, number, number];
const shift = (fields: Field[], by: number): Field[] => fields.map(([width, value, at]) => [width, value, at + by]);

/** A header of `size` bytes: its 4-byte signature, then its fields; zero elsewhere. */
function record(size: number, signature: number, fields: Field[]): Buffer {
  const buf = Buffer.alloc(size);
  buf.writeUInt32LE(signature, 0);
  for (const [width, value, at] of fields) {
    if (width === 2) buf.writeUInt16LE(value, at);
    else buf.writeUInt32LE(value, at);
  }
  return buf;
}

export function makeZip(entries: ZipInput[]): Buffer {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const e of entries) {
    const name = Buffer.from(e.name, 'utf8');
    const deflate = e.deflate ?? true;
    const packed = e.packed ?? (deflate ? zlib.deflateRawSync(e.data) : e.data);
    const crc = crc32(e.data);
    // Version needed 2.0, UTF-8 names (flag bit 11), method, CRC, packed and unpacked sizes, the name's length:
    // the same fields in a local header (from byte 4) and in its central directory entry (from byte 6).
    const common: Field[] = [
      [2, 20, 0],
      [2, 0x0800, 2],
      [2, deflate ? 8 : 0, 4],
      [4, crc, 10],
      [4, packed.length, 14],
      [4, e.data.length, 18],
      [2, name.length, 22],
    ];
    locals.push(record(30, 0x04034b50, shift(common, 4)), name, packed);
    const central = record(46, 0x02014b50, [[2, 20, 4], ...shift(common, 6), [4, offset, 42]]);
    if (!e.unlisted) centrals.push(central, name);
    offset += 30 + name.length + packed.length;
  }
  const cd = Buffer.concat(centrals);
  const listed = entries.filter((e) => !e.unlisted).length;
  const end = record(22, 0x06054b50, [
    [2, listed, 8],
    [2, listed, 10],
    [4, cd.length, 12],
    [4, offset, 16],
  ]);
  return Buffer.concat([...locals, cd, end]);
}
