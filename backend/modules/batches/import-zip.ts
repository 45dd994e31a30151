import zlib from 'node:zlib';
import { HttpProblem } from '../../lib/http-problem.ts';

/**
 * A look at an XLSX workbook's ZIP structure before anything is inflated: the central directory
 * says how many entries the archive holds and how large each becomes once unpacked. A workbook
 * with too many entries, too much to unpack, or an entry that unpacks suspiciously far (a "zip
 * bomb") is refused here, in microseconds, before the spreadsheet reader sees a byte of it.
 *
 * The entries must also lie end to end from the start of the file to the central directory, each
 * local header naming the same entry as the directory does: the spreadsheet reader walks the local
 * headers in order, so nothing may hide between the entries that the directory does not count.
 * Then `verifyZip` unpacks each entry once, never past the size the directory gives, and checks
 * its CRC: a damaged workbook is refused here rather than left to stall the spreadsheet reader.
 */

export interface ZipLimits {
  /** Most entries (files) in the archive. */
  maxEntries: number;
  /** Most bytes all entries together unpack to. */
  maxUncompressedBytes: number;
  /** Largest unpacked / packed ratio of one entry (checked for entries above `ratioFloorBytes`). */
  maxRatio: number;
  ratioFloorBytes: number;
}

export interface ZipEntry {
  name: string;
  method: number;
  crc: number;
  /** Where the packed data starts. */
  dataOffset: number;
  compressedSize: number;
  uncompressedSize: number;
  offset: number;
}

const EOCD = 0x06054b50;
const CENTRAL = 0x02014b50;
const LOCAL = 0x04034b50;
const DESCRIPTOR = 0x08074b50;

const mib = (n: number) => `${Math.round(n / 1048576).toLocaleString('en')} MiB`;

/** The workbook cannot be read as a ZIP archive at all. */
export const unreadableXlsx = () =>
  new HttpProblem(
    415,
    'Unsupported file',
    'The file is not a readable XLSX workbook (it is damaged or cut short). Save it again as .xlsx, or export it as CSV.',
  );
const unreadable = unreadableXlsx;

/** Checks the archive against the limits and returns its entries; throws a 413/422 problem otherwise. */
export function inspectZip(buf: Buffer, limits: ZipLimits): ZipEntry[] {
  // End of central directory: 22 bytes plus a comment of up to 65,535 bytes at the end of the file.
  let eocd = -1;
  for (let i = buf.length - 22; i >= Math.max(0, buf.length - 22 - 65_535); i -= 1) {
    if (buf.readUInt32LE(i) === EOCD && i + 22 + buf.readUInt16LE(i + 20) === buf.length) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) throw unreadable();
  const total = buf.readUInt16LE(eocd + 10);
  const onDisk = buf.readUInt16LE(eocd + 8);
  const cdSize = buf.readUInt32LE(eocd + 12);
  const cdOffset = buf.readUInt32LE(eocd + 16);
  // ZIP64 (more than 65,535 entries or 4 GiB) is far beyond any import.
  if (total === 0xffff || cdSize === 0xffffffff || cdOffset === 0xffffffff) throw tooManyEntries(limits);
  if (total > limits.maxEntries) throw tooManyEntries(limits);
  if (onDisk !== total || buf.readUInt16LE(eocd + 4) !== 0 || cdOffset + cdSize !== eocd || total === 0) throw unreadable();

  const entries: ZipEntry[] = [];
  let unpacked = 0;
  let p = cdOffset;
  for (let n = 0; n < total; n += 1) {
    if (p + 46 > eocd || buf.readUInt32LE(p) !== CENTRAL) throw unreadable();
    const method = buf.readUInt16LE(p + 10);
    const crc = buf.readUInt32LE(p + 16);
    const compressedSize = buf.readUInt32LE(p + 20);
    const uncompressedSize = buf.readUInt32LE(p + 24);
    const nameLength = buf.readUInt16LE(p + 28);
    const extraLength = buf.readUInt16LE(p + 30);
    const commentLength = buf.readUInt16LE(p + 32);
    const offset = buf.readUInt32LE(p + 42);
    if (p + 46 + nameLength > eocd) throw unreadable();
    const name = buf.toString('utf8', p + 46, p + 46 + nameLength);
    if (compressedSize === 0xffffffff || uncompressedSize === 0xffffffff) throw tooMuchToUnpack(limits);
    if (method !== 0 && method !== 8) throw unreadable();
    unpacked += uncompressedSize;
    if (unpacked > limits.maxUncompressedBytes) throw tooMuchToUnpack(limits);
    if (uncompressedSize > limits.ratioFloorBytes && uncompressedSize / Math.max(1, compressedSize) > limits.maxRatio) {
      throw new HttpProblem(
        413,
        'Suspicious workbook',
        `The workbook entry “${name.slice(0, 100)}” unpacks to ${Math.round(uncompressedSize / Math.max(1, compressedSize)).toLocaleString('en')} times its packed size; a workbook unpacks to at most ${limits.maxRatio} times. Save it again as .xlsx, or export it as CSV.`,
      );
    }
    entries.push({ name, method, crc, dataOffset: 0, compressedSize, uncompressedSize, offset });
    p += 46 + nameLength + extraLength + commentLength;
  }
  if (p !== eocd) throw unreadable();

  // The entries lie end to end, from the start of the file up to the central directory.
  const byOffset = [...entries].sort((a, b) => a.offset - b.offset);
  let expected = 0;
  for (const e of byOffset) {
    if (e.offset !== expected || e.offset + 30 > cdOffset || buf.readUInt32LE(e.offset) !== LOCAL) throw unreadable();
    const flags = buf.readUInt16LE(e.offset + 6);
    const nameLength = buf.readUInt16LE(e.offset + 26);
    const extraLength = buf.readUInt16LE(e.offset + 28);
    if (buf.toString('utf8', e.offset + 30, e.offset + 30 + nameLength) !== e.name) throw unreadable();
    if ((flags & 0x08) === 0 && (buf.readUInt32LE(e.offset + 18) !== e.compressedSize || buf.readUInt32LE(e.offset + 22) !== e.uncompressedSize))
      throw unreadable();
    e.dataOffset = e.offset + 30 + nameLength + extraLength;
    let end = e.dataOffset + e.compressedSize;
    if (end > cdOffset) throw unreadable();
    if (flags & 0x08) {
      // A data descriptor follows the data: with or without its signature.
      end += end + 4 <= cdOffset && buf.readUInt32LE(end) === DESCRIPTOR ? 16 : 12;
      if (end > cdOffset) throw unreadable();
    }
    expected = end;
  }
  if (expected !== cdOffset) throw unreadable();
  return entries;
}

/** Unpacks every entry (never past its stated size) and checks its CRC; throws the 415 problem otherwise. */
export function verifyZip(buf: Buffer, entries: ZipEntry[]): void {
  for (const e of entries) {
    const packed = buf.subarray(e.dataOffset, e.dataOffset + e.compressedSize);
    let data: Buffer;
    if (e.method === 0) data = packed;
    else {
      try {
        data = zlib.inflateRawSync(packed, { maxOutputLength: Math.max(1, e.uncompressedSize) });
      } catch {
        throw unreadable();
      }
    }
    if (data.length !== e.uncompressedSize || zlib.crc32(data) !== e.crc) throw unreadable();
  }
}

const tooManyEntries = (limits: ZipLimits) =>
  new HttpProblem(
    413,
    'Too many workbook entries',
    `The workbook holds more than ${limits.maxEntries.toLocaleString('en')} entries, the most one import takes (a readings workbook holds a few dozen). Save it again as .xlsx, or export it as CSV.`,
  );

const tooMuchToUnpack = (limits: ZipLimits) =>
  new HttpProblem(
    413,
    'Workbook too large',
    `The workbook unpacks to more than ${mib(limits.maxUncompressedBytes)}, the most one import takes; split the readings into smaller files.`,
  );
