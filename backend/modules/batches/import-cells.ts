import type { GravityUnit, ImportMapping } from '../../../shared/schemas/batches.ts';
import type { Cell } from './import-file.ts';

/** A cell that could not be read, with the reason a member can act on. */
export class CellError extends Error {}

const isBlank = (c: Cell) => c === null || (typeof c === 'string' && c.trim() === '');
export const cellText = (c: Cell): string =>
  c === null ? '' : c instanceof Date ? c.toISOString().replace('.000Z', 'Z') : typeof c === 'number' ? String(c) : String(c).trim();

/**
 * A number with a decimal point or a decimal comma ("1,048" and "19,5" in a semicolon file).
 * Returns the number and whatever text followed it (a unit like "°P").
 */
export function parseNumber(c: Cell): { value: number; suffix: string } | null {
  if (isBlank(c)) return null;
  if (typeof c === 'number') {
    if (!Number.isFinite(c)) throw new CellError('Not a number');
    return { value: c, suffix: '' };
  }
  if (typeof c === 'boolean' || c instanceof Date) throw new CellError(`Not a number: ${cellText(c)}`);
  const s = String(c)
    .trim()
    .replace(/[\u00a0\u202f ]/g, '');
  const m = /^([+-]?(?:\d+(?:[.,]\d+)?|[.,]\d+))(?:e([+-]?\d+))?(.*)$/i.exec(s);
  if (!m) throw new CellError(`Not a number: “${String(c).trim()}”`);
  const mantissa = m[1]!.replace(',', '.');
  const value = Number(m[2] ? `${mantissa}e${m[2]}` : mantissa);
  const suffix = (m[3] ?? '').trim();
  if (!Number.isFinite(value) || /[\d]/.test(suffix) || /[.,]/.test(suffix)) throw new CellError(`Not a number: “${String(c).trim()}”`);
  return { value, suffix };
}

/** A gravity unit as people write it. */
export function parseUnit(text: string): GravityUnit | null {
  const t = text
    .toLowerCase()
    .replace(/[°º˚\s._-]/g, '')
    .replace(/^deg(rees?)?/, '');
  if (t === '') return null;
  if (['sg', 'specificgravity', 'gravity', 'grav', 'density', 'd2020'].includes(t)) return 'sg';
  if (['p', 'plato', 'platos', 'degp', 'pl'].includes(t)) return 'plato';
  if (['bx', 'brix', 'brixwri', 'brx'].includes(t)) return 'brix';
  throw new CellError(`Unknown unit “${text.trim()}”; use SG, °P (Plato) or °Bx (Brix)`);
}

/** A temperature in the mapping's unit (or the cell's own °C/°F suffix), returned in °C. */
export function parseTemperature(c: Cell, unit: 'c' | 'f'): number | null {
  const n = parseNumber(c);
  if (!n) return null;
  let u = unit;
  const suffix = n.suffix.toLowerCase().replace(/[°º\s]/g, '');
  if (suffix === 'c' || suffix === 'celsius') u = 'c';
  else if (suffix === 'f' || suffix === 'fahrenheit') u = 'f';
  else if (suffix !== '') throw new CellError(`Not a temperature: “${cellText(c)}”`);
  const celsius = u === 'f' ? (n.value - 32) / 1.8 : n.value;
  if (celsius < -10 || celsius > 100) throw new CellError(`The temperature ${n.value} °${u.toUpperCase()} is outside −10 to 100 °C`);
  return Math.round(celsius * 100) / 100;
}

// ---------------------------------------------------------------------------------------------
// Times
// ---------------------------------------------------------------------------------------------

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatterFor(tz: string) {
  let f = formatters.get(tz);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone: tz,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: 'numeric',
      minute: 'numeric',
      second: 'numeric',
    });
    formatters.set(tz, f);
  }
  return f;
}
const offsetCache = new Map<string, number>();
/** The zone's offset from UTC at instant t, ms (cached per zone and hour). */
function zoneOffset(t: number, tz: string): number {
  const key = `${tz}|${Math.floor(t / 3_600_000)}`;
  const hit = offsetCache.get(key);
  if (hit !== undefined) return hit;
  const parts = Object.fromEntries(
    formatterFor(tz)
      .formatToParts(new Date(t))
      .map((p) => [p.type, p.value]),
  );
  const asUtc = Date.UTC(Number(parts.year), Number(parts.month) - 1, Number(parts.day), Number(parts.hour), Number(parts.minute), Number(parts.second));
  const offset = asUtc - Math.floor(t / 1000) * 1000;
  if (offsetCache.size > 50_000) offsetCache.clear();
  offsetCache.set(key, offset);
  return offset;
}

/** A wall-clock time in `tz` → epoch ms. */
export function zonedTime(y: number, mo: number, d: number, h: number, mi: number, s: number, ms: number, tz: string): number {
  const wall = Date.UTC(y, mo - 1, d, h, mi, s, ms);
  if (tz === 'UTC' || tz === 'Etc/UTC') return wall;
  const first = zoneOffset(wall, tz);
  let t = wall - first;
  const second = zoneOffset(t, tz);
  if (second !== first) t = wall - second;
  return t;
}

function checkParts(y: number, mo: number, d: number, h: number, mi: number, s: number) {
  if (mo < 1 || mo > 12) throw new CellError(`There is no month ${mo}`);
  const days = new Date(Date.UTC(y, mo, 0)).getUTCDate();
  if (d < 1 || d > days) throw new CellError(`There is no day ${d} in month ${mo} of ${y}`);
  if (h > 23 || mi > 59 || s > 59) throw new CellError(`There is no time ${h}:${String(mi).padStart(2, '0')}`);
}

const EXCEL_EPOCH_MS = Date.UTC(1899, 11, 30);
/** Excel's 1900 date system: days since 1899-12-30 (the 1900 leap-year quirk is before any reading). */
function fromExcelSerial(serial: number, tz: string): number {
  const wall = EXCEL_EPOCH_MS + Math.round(serial * 86_400_000);
  const d = new Date(wall);
  return zonedTime(d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds(), d.getUTCMilliseconds(), tz);
}

function fromNumber(n: number, tz: string): number {
  if (n >= 1e11) return Math.round(n); // epoch milliseconds
  if (n >= 1e8) return Math.round(n * 1000); // epoch seconds
  if (n >= 1 && n < 2_958_466) return fromExcelSerial(n, tz); // Excel date serial (to year 9999)
  throw new CellError(`${n} is not a date`);
}

function applyOffset(wall: number, offset: string | undefined, parts: number[], tz: string): number {
  if (offset === undefined) {
    const [y, mo, d, h, mi, s, ms] = parts as [number, number, number, number, number, number, number];
    return zonedTime(y, mo, d, h, mi, s, ms, tz);
  }
  if (/^z$/i.test(offset) || /^(utc|gmt)$/i.test(offset)) return wall;
  const m = /^([+-])(\d{2}):?(\d{2})?$/.exec(offset)!;
  const minutes = Number(m[2]) * 60 + Number(m[3] ?? 0);
  return wall - (m[1] === '-' ? -1 : 1) * minutes * 60_000;
}

const ISO = /^(\d{4})-(\d{1,2})-(\d{1,2})(?:[T\s]+(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,6}))?)?)?\s*(Z|UTC|GMT|[+-]\d{2}(?::?\d{2})?)?$/i;
const NUMERIC =
  /^(\d{1,4})[./-](\d{1,2})[./-](\d{1,4})(?:[T\s,]+(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,6}))?)?\s*(am|pm)?)?\s*(Z|UTC|GMT|[+-]\d{2}(?::?\d{2})?)?$/i;

/** For `auto`: reads the slash or dot dates of a whole column to tell day-first from month-first. */
export function detectDateOrder(cells: Cell[]): 'dmy' | 'mdy' | 'ymd' {
  let dayFirst = false;
  let monthFirst = false;
  let yearFirst = false;
  for (const c of cells) {
    if (typeof c !== 'string') continue;
    const m = NUMERIC.exec(c.trim());
    if (!m) continue;
    const a = Number(m[1]);
    const b = Number(m[2]);
    if (m[1]!.length === 4) yearFirst = true;
    else if (a > 12 && b <= 12) dayFirst = true;
    else if (b > 12 && a <= 12) monthFirst = true;
  }
  if (yearFirst) return 'ymd';
  if (monthFirst && !dayFirst) return 'mdy';
  return 'dmy';
}

/** The time of a reading as epoch ms: ISO 8601, day/month/year text, Excel serials, spreadsheet dates. */
export function parseTakenAt(c: Cell, order: 'dmy' | 'mdy' | 'ymd', tz: string): number {
  if (isBlank(c)) throw new CellError('The time is missing');
  if (c instanceof Date) {
    // Spreadsheet dates carry the wall-clock time in their UTC fields.
    if (Number.isNaN(c.getTime())) throw new CellError('Not a date');
    return zonedTime(
      c.getUTCFullYear(),
      c.getUTCMonth() + 1,
      c.getUTCDate(),
      c.getUTCHours(),
      c.getUTCMinutes(),
      c.getUTCSeconds(),
      c.getUTCMilliseconds(),
      tz,
    );
  }
  if (typeof c === 'number') return fromNumber(c, tz);
  if (typeof c === 'boolean') throw new CellError('Not a date');
  const s = String(c).trim();
  if (/^\d+(?:[.,]\d+)?$/.test(s)) return fromNumber(Number(s.replace(',', '.')), tz);
  let m = ISO.exec(s);
  if (m) {
    const parts = [
      Number(m[1]),
      Number(m[2]),
      Number(m[3]),
      Number(m[4] ?? 0),
      Number(m[5] ?? 0),
      Number(m[6] ?? 0),
      Number((m[7] ?? '0').padEnd(3, '0').slice(0, 3)),
    ];
    checkParts(parts[0]!, parts[1]!, parts[2]!, parts[3]!, parts[4]!, parts[5]!);
    const wall = Date.UTC(parts[0]!, parts[1]! - 1, parts[2], parts[3], parts[4], parts[5], parts[6]);
    return applyOffset(wall, m[8], parts, tz);
  }
  m = NUMERIC.exec(s);
  if (m) {
    const a = Number(m[1]);
    const b = Number(m[2]);
    const cc = Number(m[3]);
    let y: number;
    let mo: number;
    let d: number;
    if (m[1]!.length === 4 || order === 'ymd') [y, mo, d] = [a, b, cc];
    else if (order === 'mdy') [mo, d, y] = [a, b, cc];
    else [d, mo, y] = [a, b, cc];
    if (y < 100) y += 2000;
    let h = Number(m[4] ?? 0);
    const ampm = m[8]?.toLowerCase();
    if (ampm) {
      if (h < 1 || h > 12) throw new CellError(`There is no time ${h} ${ampm}`);
      if (ampm === 'pm' && h < 12) h += 12;
      if (ampm === 'am' && h === 12) h = 0;
    }
    const parts = [y, mo, d, h, Number(m[5] ?? 0), Number(m[6] ?? 0), Number((m[7] ?? '0').padEnd(3, '0').slice(0, 3))];
    checkParts(parts[0]!, parts[1]!, parts[2]!, parts[3]!, parts[4]!, parts[5]!);
    const wall = Date.UTC(parts[0]!, parts[1]! - 1, parts[2], parts[3], parts[4], parts[5], parts[6]);
    return applyOffset(wall, m[9], parts, tz);
  }
  throw new CellError(`Cannot read “${s}” as a date and time; use e.g. 2026-10-03 14:05`);
}

// ---------------------------------------------------------------------------------------------
// Proposing a mapping from header names
// ---------------------------------------------------------------------------------------------

const patterns: { field: 'takenAt' | 'gravity' | 'unit' | 'temperature' | 'note'; re: RegExp }[] = [
  { field: 'takenAt', re: /(^|\b)(taken|time|timestamp|date|datetime|when|measured|datum|zeit|fecha|recorded)/i },
  { field: 'unit', re: /(^|\b)(unit|scale|einheit)s?\b/i },
  { field: 'temperature', re: /(temp|°c|°f|celsius|fahrenheit|\bdeg\s*[cf]\b)/i },
  { field: 'gravity', re: /(gravity|\bsg\b|plato|°p\b|brix|°bx|density|dichte|extract|\bog\b|\bfg\b|reading)/i },
  { field: 'note', re: /(note|comment|remark|memo|bemerkung)/i },
];

/** A mapping guessed from the header names; `complete` says whether time and gravity were found. */
export function proposeMapping(headers: string[]): { mapping: Partial<ImportMapping>; complete: boolean } {
  const taken = new Set<string>();
  const found: Partial<Record<'takenAt' | 'gravity' | 'unit' | 'temperature' | 'note', string>> = {};
  for (const { field, re } of patterns) {
    const h = headers.find((x) => !taken.has(x) && re.test(x));
    if (h) {
      found[field] = h;
      taken.add(h);
    }
  }
  const mapping: Partial<ImportMapping> = { ...found };
  if (found.gravity) {
    if (/plato|°p\b/i.test(found.gravity)) mapping.gravityUnit = 'plato';
    else if (/brix|°bx/i.test(found.gravity)) mapping.gravityUnit = 'brix';
    else mapping.gravityUnit = 'sg';
  }
  if (found.temperature) mapping.temperatureUnit = /°f|fahrenheit|\bf\b|_f\b|\(f\)/i.test(found.temperature) ? 'f' : 'c';
  return { mapping, complete: Boolean(found.takenAt && found.gravity) };
}
