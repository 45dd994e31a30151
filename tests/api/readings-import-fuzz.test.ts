import ExcelJS from 'exceljs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { FermentationSettings } from '../../shared/schemas/batches.ts';
import { HttpProblem } from '../../backend/lib/http-problem.ts';
import type { BatchRow } from '../../backend/modules/batches/batches.service.ts';
import { loadFermentationSettings } from '../../backend/modules/batches/figures.ts';
import { importReadings } from '../../backend/modules/batches/readings-import.service.ts';
import { createBatch } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { countReadings } from '../helpers/counts.ts';
import { makeZip } from '../helpers/zip.ts';

// Generated files thrown at the reading import: CSVs with random cells, delimiters, quotes, BOMs
// and encodings, odd numbers and dates, control characters, random bytes, damaged ZIPs and
// workbooks with odd cell types. Whatever comes in, the import either takes the file or refuses
// it with a 4xx problem in its own words; a refused import writes nothing and an accepted one
// writes exactly the readings it reports. Most files go straight to the import service (the same
// code the route calls, thread and database included); a sizeable share goes through HTTP.

let ctx: TestContext;
let member: ApiClient;
let settings: FermentationSettings;
const batchIds: string[] = [];
const workbooks: Buffer[] = [];
let files = 0;
const statuses = new Map<number, number>();

useTestContext(async (created) => {
  ctx = created;
  member = await ctx.signIn('member@example.org');
  settings = await loadFermentationSettings(ctx.db);
  for (let i = 0; i < 4; i += 1)
    batchIds.push((await createBatch(ctx.db, { ownerId: member.user.id, name: `Fuzz batch ${i + 1}`, style: 'Pale ale', volumeLiters: 23 })).id);
  // Good workbooks to damage.
  for (const rows of [3, 40]) {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Readings');
    ws.addRow(['Taken at', 'Gravity', 'Unit', 'Temperature °C', 'Note']);
    for (let r = 0; r < rows; r += 1) ws.addRow([new Date(Date.UTC(2026, 9, 1, r)), 1.05 - r / 2000, 'SG', 20, `row ${r}`]);
    workbooks.push(Buffer.from(await wb.xlsx.writeBuffer()));
  }
  workbooks.push(
    makeZip([
      { name: '[Content_Types].xml', data: Buffer.from('<Types/>') },
      { name: 'xl/workbook.xml', data: Buffer.from('<workbook><sheets/></workbook>') },
    ]),
  );
});

interface FuzzFile {
  kind: string;
  name: string;
  bytes: Buffer;
  mapping?: string;
  dryRun: boolean;
}

// ---------------------------------------------------------------------------------------------
// Cells
// ---------------------------------------------------------------------------------------------

const pad = (n: number, w = 2) => String(n).padStart(w, '0');
const when = fc.date({ min: new Date('2019-01-01T00:00:00Z'), max: new Date('2026-11-30T00:00:00Z'), noInvalidDate: true });
const dateCell = fc.oneof(
  when.map((d) => d.toISOString()),
  when.map((d) => `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())} ${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}`),
  when.map((d) => `${pad(d.getUTCDate())}.${pad(d.getUTCMonth() + 1)}.${d.getUTCFullYear()} ${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}`),
  when.map(
    (d) =>
      `${d.getUTCMonth() + 1}/${d.getUTCDate()}/${d.getUTCFullYear()} ${d.getUTCHours() % 12 || 12}:${pad(d.getUTCMinutes())} ${d.getUTCHours() < 12 ? 'AM' : 'PM'}`,
  ),
  when.map((d) => String(d.getTime() / 86_400_000 + 25_569)),
  fc.constantFrom(
    '2026-02-30 09:00',
    '2099-01-01 00:00',
    '1899-12-31',
    '0',
    '-1',
    '1e308',
    'next tuesday',
    '',
    '  ',
    '31/31/2031',
    '2026-13-01',
    '24:61',
    'T',
    '+',
    '2026-10-03T14:05:00+99:00',
  ),
  fc.integer({ min: -2_000_000, max: 2_000_000 }).map(String),
);
const numberCell = fc.oneof(
  fc.double({ min: 0.98, max: 1.15, noNaN: true }).map((v) => v.toFixed(3)),
  fc.double({ min: 0, max: 30, noNaN: true }).map((v) => v.toFixed(1).replace('.', ',')),
  fc.double().map(String),
  fc.integer().map(String),
  fc.constantFrom('NaN', 'Infinity', '-Infinity', '-0', '1e400', '-1e400', '1.0x4', '12.5 °P', '1,048', '1.048.000', '٣', '', ' ', '0x10', '1_000'),
);
const unitCell = fc.oneof(fc.constantFrom('SG', 'sg', '°P', 'Plato', '°Bx', 'brix', '', 'Oechsle', 'P', '°'), fc.string({ maxLength: 4 }));
const junkCell = fc.oneof(
  fc.string({ maxLength: 12 }),
  fc.string({ unit: 'binary', maxLength: 12 }),
  fc.constantFrom('"', '""', '"a"b"', '\u0000', '\r', '\n', '\r\n', '=1+2', ';', ',', '\t', '\uFEFF', '\u202e', '💥', 'a'.repeat(3000)),
);
const anyCell = fc.oneof(dateCell, numberCell, unitCell, junkCell);

const templateRow = fc.tuple(dateCell, numberCell, unitCell, numberCell, junkCell);
const headerRow: fc.Arbitrary<string[]> = fc.oneof(
  fc.constant<string[]>(['Taken at', 'Gravity', 'Unit', 'Temperature °C', 'Note']),
  fc.constant<string[]>(['Date', 'SG']),
  fc.array(fc.oneof(junkCell, fc.constantFrom('Taken at', 'Gravity', 'Time', 'Reading', '')), { minLength: 0, maxLength: 8 }),
);

// ---------------------------------------------------------------------------------------------
// Files
// ---------------------------------------------------------------------------------------------

const csvFile: fc.Arbitrary<FuzzFile> = fc
  .record({
    header: headerRow,
    rows: fc.array(fc.oneof({ weight: 3, arbitrary: templateRow.map((r) => [...r]) }, { weight: 1, arbitrary: fc.array(anyCell, { maxLength: 9 }) }), {
      maxLength: 30,
    }),
    delimiter: fc.constantFrom(',', ';', '\t', '|'),
    quote: fc.constantFrom('needed', 'always', 'broken'),
    eol: fc.constantFrom('\n', '\r\n', '\r'),
    bom: fc.boolean(),
    encoding: fc.constantFrom('utf8', 'utf8', 'utf8', 'utf16le', 'latin1'),
    truncate: fc.option(fc.nat(), { nil: undefined }),
    name: fc.constantFrom('readings.csv', 'readings.tsv', 'readings.txt', 'readings', 'readings.xlsx'),
    dryRun: fc.boolean(),
  })
  .map(({ header, rows, delimiter, quote, eol, bom, encoding, truncate, name, dryRun }) => {
    const field = (c: string, i: number) => {
      if (quote === 'always') return `"${c.replaceAll('"', '""')}"`;
      if (quote === 'broken' && i % 3 === 0) return `"${c}`;
      return /["\r\n]/.test(c) || c.includes(delimiter) ? `"${c.replaceAll('"', '""')}"` : c;
    };
    let text = [header, ...rows].map((r: string[]) => r.map(field).join(delimiter)).join(eol);
    if (truncate !== undefined) text = text.slice(0, truncate % (text.length + 1));
    if (bom) text = `\uFEFF${text}`;
    const bytes =
      encoding === 'utf16le'
        ? Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text.replace(/^\uFEFF/, ''), 'utf16le')])
        : Buffer.from(text, encoding as BufferEncoding);
    return { kind: 'csv', name, bytes, dryRun };
  });

const xlsxCell = fc.oneof(
  when,
  fc.double(),
  fc.integer(),
  fc.boolean(),
  fc.constant(null),
  junkCell,
  numberCell,
  dateCell,
  // The spreadsheet writer wants plain objects (fast-check's records have no prototype).
  fc.record({ formula: fc.constantFrom('1+1', 'A1', 'NOW()', '#REF!'), result: fc.oneof(fc.double(), junkCell, when) }).map((o) => ({ ...o })),
  fc.array(junkCell, { maxLength: 3 }).map((texts) => ({ richText: texts.map((text) => ({ text })) })),
  fc.record({ text: junkCell, hyperlink: fc.constantFrom('https://example.org/', 'mailto:x@example.org') }).map((o) => ({ ...o })),
  fc.constantFrom('#N/A', '#DIV/0!', '#VALUE!').map((error) => ({ error })),
);
const xlsxFile: fc.Arbitrary<FuzzFile> = fc
  .record({
    header: headerRow,
    rows: fc.array(
      fc.oneof(
        templateRow.map((r) => [...r] as unknown[]),
        fc.array(xlsxCell, { maxLength: 8 }),
      ),
      { maxLength: 25 },
    ),
    skip: fc.nat({ max: 3 }),
    sheets: fc.nat({ max: 2 }),
    dryRun: fc.boolean(),
    name: fc.constantFrom('readings.xlsx', 'readings.xlsx', 'readings.csv', 'readings'),
  })
  .map(({ header, rows, skip, sheets, dryRun, name }) => ({ kind: 'xlsx', name, dryRun, build: { header, rows, skip, sheets } }))
  .map((f) => f as unknown as FuzzFile);

async function buildXlsx(spec: { header: unknown[]; rows: unknown[][]; skip: number; sheets: number }): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  for (let s = 0; s < spec.sheets; s += 1) wb.addWorksheet(`Empty ${s}`);
  const ws = wb.addWorksheet('Readings');
  for (let i = 0; i < spec.skip; i += 1) ws.addRow([]);
  ws.addRow(spec.header);
  for (const r of spec.rows) ws.addRow(r);
  wb.addWorksheet('After').addRow(['not', 'read']);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

const damagedZip: fc.Arbitrary<FuzzFile> = fc
  .record({
    which: fc.nat(),
    how: fc.constantFrom('truncate', 'flip', 'splice', 'tail'),
    at: fc.nat(),
    bytes: fc.uint8Array({ minLength: 1, maxLength: 64 }),
    dryRun: fc.boolean(),
  })
  .map(({ which, how, at, bytes, dryRun }) => {
    const src = Buffer.from(workbooks.length ? workbooks[which % workbooks.length]! : Buffer.alloc(0));
    const i = src.length ? at % src.length : 0;
    let out: Buffer;
    if (how === 'truncate') out = src.subarray(0, i);
    else if (how === 'flip') {
      out = Buffer.from(src);
      bytes.forEach((b, k) => {
        const j = (i + k * 97) % Math.max(1, out.length);
        if (out.length) out[j] = out[j]! ^ (b || 1);
      });
    } else if (how === 'splice') out = Buffer.concat([src.subarray(0, i), Buffer.from(bytes), src.subarray(i)]);
    else out = Buffer.concat([src.subarray(0, src.length - (i % 200)), Buffer.from(bytes)]);
    return { kind: `zip-${how}`, name: 'readings.xlsx', bytes: out, dryRun };
  });

const randomBytes: fc.Arbitrary<FuzzFile> = fc
  .record({
    bytes: fc.uint8Array({ maxLength: 3000 }),
    zipMagic: fc.boolean(),
    name: fc.constantFrom('readings.csv', 'readings.xlsx', 'readings.bin', 'readings.xls'),
    dryRun: fc.boolean(),
  })
  .map(({ bytes, zipMagic, name, dryRun }) => ({
    kind: 'bytes',
    name,
    bytes: zipMagic ? Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.from(bytes)]) : Buffer.from(bytes),
    dryRun,
  }));

const mappingField = fc.option(
  fc.oneof(
    fc
      .record(
        {
          takenAt: fc.constantFrom('Taken at', 'Date', 'Time', 'nope', ''),
          gravity: fc.constantFrom('Gravity', 'SG', 'x'),
          unit: fc.constantFrom('Unit', null),
          temperature: fc.constantFrom('Temperature °C', null),
          gravityUnit: fc.constantFrom('sg', 'plato', 'brix', 'oechsle'),
          dateOrder: fc.constantFrom('auto', 'dmy', 'mdy', 'ymd', 'yyy'),
          timeZone: fc.constantFrom('UTC', 'Europe/Berlin', 'America/Chicago', 'Mars/Olympus'),
          onDuplicate: fc.constantFrom('error', 'skip'),
          correctTemperature: fc.boolean(),
        },
        { requiredKeys: ['takenAt', 'gravity'] },
      )
      .map((m) => JSON.stringify(m)),
    fc.jsonValue().map((v) => JSON.stringify(v)),
    fc.string({ maxLength: 20 }),
  ),
  { nil: undefined, freq: 2 },
);

const fuzzFile = fc
  .tuple(
    fc.oneof(
      { weight: 5, arbitrary: csvFile },
      { weight: 2, arbitrary: xlsxFile },
      { weight: 2, arbitrary: damagedZip },
      { weight: 1, arbitrary: randomBytes },
    ),
    mappingField,
    fc.nat({ max: 3 }),
  )
  .map(([f, mapping, batch]) => ({ ...f, mapping, batch }));

async function materialise(f: FuzzFile & { build?: Parameters<typeof buildXlsx>[0] }): Promise<Buffer> {
  return f.build ? buildXlsx(f.build) : f.bytes;
}

/** What a refusal may never say: a library's or the runtime's own words. */
const internals =
  /cannot read propert|is not a function|undefined is not|typeerror|rangeerror|invalid (?:block|distance|signature|stored)|unexpected end|end of (?:data|central)|unzip|sax|papa|exceljs|multipart:|\bat \S+\.(?:js|ts|mjs):\d+/i;

function checkRefusal(status: number, body: { title?: string; detail?: string; errors?: { message: string; row?: number; column?: string }[] }, kind: string) {
  expect([400, 409, 413, 415, 422], `${kind}: ${status} ${JSON.stringify(body).slice(0, 300)}`).toContain(status);
  expect(body.title).toBeTruthy();
  expect(body.detail).toBeTruthy();
  if (status !== 422) expect(`${body.title} ${body.detail}`, kind).not.toMatch(internals);
  for (const e of body.errors ?? []) {
    // Row problems quote the cell they are about; their own words are the product's.
    if (e.row !== undefined) expect(typeof e.column).toBe('string');
    expect(e.message).toBeTruthy();
  }
}

describe('fuzzing the reading import', { timeout: 240_000 }, () => {
  it('takes each file whole or refuses it with a 4xx problem, writing nothing — through the import service', async () => {
    await fc.assert(
      fc.asyncProperty(fuzzFile, async (f) => {
        const bytes = await materialise(f);
        const batchId = batchIds[f.batch]!;
        const batch = (await ctx.db.selectFrom('batch').selectAll().where('id', '=', batchId).executeTakeFirstOrThrow()) as unknown as BatchRow;
        const before = await countReadings(ctx, batchId);
        files += 1;
        try {
          const result = await importReadings(ctx.db, {
            batch,
            file: {
              buffer: bytes,
              originalname: f.name,
              mimetype: f.name.endsWith('.xlsx') ? 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' : 'text/csv',
              size: bytes.length,
            },
            mappingField: f.mapping,
            dryRun: f.dryRun,
            actor: { id: member.user.id, roles: ['member'] },
            settings,
            timeZone: 'UTC',
            now: ctx.clock.now(),
          });
          statuses.set(200, (statuses.get(200) ?? 0) + 1);
          const after = await countReadings(ctx, batchId);
          expect(after - before, f.kind).toBe(f.dryRun ? 0 : result.imported);
          if (f.dryRun) expect(result.preview).toBeTruthy();
        } catch (err) {
          if (!(err instanceof HttpProblem)) throw err;
          statuses.set(err.status, (statuses.get(err.status) ?? 0) + 1);
          checkRefusal(err.status, { title: err.title, detail: err.detail, errors: err.errors }, f.kind);
          expect(await countReadings(ctx, batchId), f.kind).toBe(before);
        }
      }),
      { numRuns: Number(process.env.FUZZ_RUNS ?? 850), seed: 20261204 },
    );
  });

  it('never answers 500 and refuses with problem JSON — through HTTP', async () => {
    await fc.assert(
      fc.asyncProperty(fuzzFile, async (f) => {
        const bytes = await materialise(f);
        const batchId = batchIds[f.batch]!;
        const before = await countReadings(ctx, batchId);
        files += 1;
        let req = member.post(`/api/batches/${batchId}/readings/import${f.dryRun ? '?dryRun=1' : ''}`);
        if (f.mapping !== undefined) req = req.field('mapping', f.mapping);
        const res = await req.attach('file', bytes, {
          filename: f.name,
          contentType: f.name.endsWith('.xlsx') ? 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' : 'text/csv',
        });
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
        const after = await countReadings(ctx, batchId);
        if (res.status === 200) {
          expect(res.headers['content-type']).toMatch(/application\/json/);
          expect(after - before, f.kind).toBe(f.dryRun ? 0 : res.body.imported);
        } else {
          expect(res.headers['content-type'], `${f.kind}: ${res.status}`).toMatch(/application\/problem\+json/);
          checkRefusal(res.status, res.body, f.kind);
          expect(after, f.kind).toBe(before);
        }
      }),
      { numRuns: 200, seed: 4122026 },
    );
  });

  it('sent at least a thousand files, and some of each outcome', () => {
    expect(files).toBeGreaterThanOrEqual(1000);
    expect(statuses.get(200) ?? 0).toBeGreaterThan(50);
    expect(statuses.get(422) ?? 0).toBeGreaterThan(50);
    expect(statuses.get(415) ?? 0).toBeGreaterThan(20);
    expect(statuses.has(500)).toBe(false);
  });
});
