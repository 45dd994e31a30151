import { randomUUID } from 'node:crypto';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import { correctHydrometer } from '../../shared/brewing/index.ts';
import { IMPORT_MAX_BYTES } from '../../backend/modules/batches/batches.routes.ts';
import { createBatch } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import { countReadings } from '../helpers/counts.ts';
import { binary } from '../helpers/http.ts';

let ctx: TestContext;
let member: ApiClient, member2: ApiClient, brewer: ApiClient, treasurer: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  [member, member2, brewer, treasurer] = await signInAs(ctx, 'member', 'member2', 'brewer', 'treasurer');
});

interface ImportProblem {
  row: number;
  column: string;
  path: string;
  message: string;
}

/** A planned batch of the client's own, with no readings yet. */
async function newBatch(client: ApiClient = member, name = 'Import test batch') {
  const batch = await createBatch(ctx.db, { ownerId: client.user.id, name, style: 'Pale ale', volumeLiters: 23 });
  expect(batch.status).toBe('planned');
  return batch.id;
}

function upload(
  client: ApiClient,
  batchId: string,
  content: string | Buffer,
  filename: string,
  opts: { dryRun?: boolean; mapping?: object | string; progressId?: string; contentType?: string } = {},
) {
  const url = `/api/batches/${batchId}/readings/import${opts.dryRun ? '?dryRun=1' : ''}`;
  let req = client.post(url);
  if (opts.mapping !== undefined) req = req.field('mapping', typeof opts.mapping === 'string' ? opts.mapping : JSON.stringify(opts.mapping));
  if (opts.progressId) req = req.field('progressId', opts.progressId);
  const buffer = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
  return req.attach('file', buffer, {
    filename,
    contentType: opts.contentType ?? (filename.endsWith('.xlsx') ? 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' : 'text/csv'),
  });
}

const goodCsv = [
  'Taken at,Gravity,Unit,Temperature °C,Note',
  '2026-10-01 09:00,1.052,SG,20,pitched',
  '2026-10-02 09:00,1.046,SG,20,',
  '2026-10-03 09:00,1.035,SG,20,"krausen high, smells fine"',
  '2026-10-04 09:00,7.5,°P,20,',
  '2026-10-06 09:00,1.014,SG,20,',
].join('\n');

describe('importing a good CSV', { timeout: 60_000 }, () => {
  it('previews with a proposed mapping and writes nothing, then imports every row in one go', async () => {
    const batchId = await newBatch();
    const preview = await upload(member, batchId, goodCsv, 'readings.csv', { dryRun: true });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    expect(preview.body.imported).toBe(0);
    const p = preview.body.preview;
    expect(p).toMatchObject({ fileType: 'csv', delimiter: ',', totalRows: 5, validRows: 5, errorCount: 0, mappingSource: 'proposed' });
    expect(p.mapping).toMatchObject({ takenAt: 'Taken at', gravity: 'Gravity', unit: 'Unit', temperature: 'Temperature °C', note: 'Note' });
    expect(p.rows[2]).toMatchObject({ row: 4, status: 'ok', note: 'krausen high, smells fine', gravity: 1.035, unit: 'sg' });
    expect(p.rows[3]).toMatchObject({ unit: 'plato', gravity: 7.5 });
    expect(await countReadings(ctx, batchId)).toBe(0);

    const res = await upload(member, batchId, goodCsv, 'readings.csv');
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toEqual({ imported: 5, skipped: 0 });
    const rows = await ctx.db.selectFrom('reading').selectAll().where('batch_id', '=', batchId).orderBy('taken_at').execute();
    expect(rows).toHaveLength(5);
    expect(rows[0]).toMatchObject({ source: 'import', entered_unit: 'sg', note: 'pitched', created_by: member.user.id });
    expect(rows[0]!.taken_at.toISOString()).toBe('2026-10-01T09:00:00.000Z'); // the co-op's time zone (UTC in the fixture)
    expect(Number(rows[3]!.entered_value)).toBe(7.5);
    expect(rows[3]!.entered_unit).toBe('plato');
    const audit = await ctx.db
      .selectFrom('audit_log')
      .select(['action', 'detail'])
      .where('subject_id', '=', batchId)
      .where('action', '=', 'readings:imported')
      .executeTakeFirstOrThrow();
    expect(audit.detail).toMatchObject({ imported: 5, file: 'readings.csv' });
    const batch = (await member.get(`/api/batches/${batchId}`)).body;
    expect(batch.og).toBe(1.052);
    expect(batch.status).toBe('fermenting');
  });

  it('remembers the member’s mapping and proposes it for the next file', async () => {
    const batchId = await newBatch();
    const csv = ['When,Reading,Temp F', '2026-10-01 09:00,1.050,68', '2026-10-02 09:00,1.044,68'].join('\n');
    const mapping = { takenAt: 'When', gravity: 'Reading', temperature: 'Temp F', temperatureUnit: 'f', gravityUnit: 'sg' };
    const first = await upload(member, batchId, csv, 'a.csv', { mapping });
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    const t = await ctx.db
      .selectFrom('reading')
      .select(['temperature_c', 'gravity_sg'])
      .where('batch_id', '=', batchId)
      .orderBy('taken_at')
      .executeTakeFirstOrThrow();
    expect(Number(t.temperature_c)).toBe(20);
    expect(Number(t.gravity_sg)).toBeCloseTo(correctHydrometer(1.05, 20), 4);
    const next = await upload(member, await newBatch(), csv, 'b.csv', { dryRun: true });
    expect(next.body.preview.mappingSource).toBe('remembered');
    expect(next.body.preview.mapping).toMatchObject(mapping);
    // Another member has their own memory.
    const other = await upload(member2, await newBatch(member2), csv, 'b.csv', { dryRun: true });
    expect(other.body.preview.mappingSource).toBe('proposed');
  });

  it('reads semicolons with decimal commas and a BOM, tabs, quoted fields and Excel date serials', async () => {
    const batchId = await newBatch();
    const semicolon =
      '\uFEFFDatum;Gravity (SG);Temperatur °C;Note\r\n03.10.2026 08:30;1,048;19,5;"a; b"\r\n04.10.2026 08:30;1,040;19,0;"line one\nline two"\r\n';
    const r1 = await upload(member, batchId, semicolon, 'semicolon.csv', { dryRun: true });
    expect(r1.status, JSON.stringify(r1.body)).toBe(200);
    const p1 = r1.body.preview;
    expect(p1.delimiter).toBe(';');
    expect(p1.headers[0]).toBe('Datum'); // BOM gone
    expect(p1.errorCount).toBe(0);
    expect(p1.rows[0]).toMatchObject({ gravity: 1.048, temperatureC: 19.5, takenAt: '2026-10-03T08:30:00.000Z', note: 'a; b' });
    expect(p1.rows[1].note).toBe('line one\nline two');
    expect((await upload(member, batchId, semicolon, 'semicolon.csv')).body).toEqual({ imported: 2, skipped: 0 });

    const tab = 'Time\tSG\tNote\n2026-10-05T08:00:00+02:00\t1.030\tafter dry hop\n\n2026-10-06T08:00:00+02:00\t1.022\t\n';
    const r2 = await upload(member, batchId, tab, 'tabs.tsv');
    expect(r2.status, JSON.stringify(r2.body)).toBe(200);
    expect(r2.body).toEqual({ imported: 2, skipped: 1 }); // the blank line is skipped
    const t = await ctx.db
      .selectFrom('reading')
      .select('taken_at')
      .where('batch_id', '=', batchId)
      .where('note', '=', 'after dry hop')
      .executeTakeFirstOrThrow();
    expect(t.taken_at.toISOString()).toBe('2026-10-05T06:00:00.000Z');

    // 46302.5 is 2026-10-07 12:00 in Excel's 1900 date system.
    const serials = 'Date,Gravity\n46302.5,1.016\n46303.25,1.014\n';
    const r3 = await upload(member, batchId, serials, 'serials.csv', { dryRun: true });
    expect(r3.body.preview.rows[0].takenAt).toBe('2026-10-07T12:00:00.000Z');
    expect(r3.body.preview.rows[1].takenAt).toBe('2026-10-08T06:00:00.000Z');
    expect((await upload(member, batchId, serials, 'serials.csv')).body.imported).toBe(2);
    expect(await countReadings(ctx, batchId)).toBe(6);
  });

  it('reads times without an offset in the time zone the mapping names', async () => {
    const batchId = await newBatch();
    const csv = 'Taken at,Gravity\n2026-10-03 14:05,1.050\n10/04/2026 2:05 PM,1.045\n';
    const res = await upload(member, batchId, csv, 'tz.csv', {
      dryRun: true,
      mapping: { takenAt: 'Taken at', gravity: 'Gravity', timeZone: 'America/Chicago', dateOrder: 'mdy' },
    });
    expect(res.body.preview.rows[0].takenAt).toBe('2026-10-03T19:05:00.000Z');
    expect(res.body.preview.rows[1].takenAt).toBe('2026-10-04T19:05:00.000Z');
  });

  it('lets a brewer on duty import into any batch; skips duplicates when asked', async () => {
    const batchId = await newBatch();
    expect((await upload(brewer, batchId, goodCsv, 'readings.csv')).body).toEqual({ imported: 5, skipped: 0 });
    const again = await upload(brewer, batchId, `${goodCsv}\n2026-10-08 09:00,1.012,SG,20,`, 'readings.csv', {
      mapping: { takenAt: 'Taken at', gravity: 'Gravity', unit: 'Unit', temperature: 'Temperature °C', note: 'Note', onDuplicate: 'skip' },
    });
    expect(again.status, JSON.stringify(again.body)).toBe(200);
    expect(again.body).toEqual({ imported: 1, skipped: 5 });
  });

  it('reports progress in a row that the client polls', async () => {
    const batchId = await newBatch();
    const progressId = randomUUID();
    expect((await upload(member, batchId, goodCsv, 'readings.csv', { progressId })).status).toBe(200);
    const p = await member.get(`/api/batches/${batchId}/readings/import/progress/${progressId}`);
    expect(p.status).toBe(200);
    expect(p.body.progress).toMatchObject({ id: progressId, phase: 'done', rowsDone: 5, rowsTotal: 5 });
    expect((await member2.get(`/api/batches/${batchId}/readings/import/progress/${progressId}`)).status).toBe(404);
  });
});

async function xlsxOf(rows: unknown[][], opts: { dateFormat?: string } = {}) {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Readings');
  for (const r of rows) ws.addRow(r);
  if (opts.dateFormat) ws.getColumn(1).numFmt = opts.dateFormat;
  wb.addWorksheet('Other').addRow(['not', 'read']);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

describe('importing a good XLSX', () => {
  it('reads spreadsheet dates, numbers and text through the streaming reader', async () => {
    const batchId = await newBatch();
    const buf = await xlsxOf(
      [
        ['Taken at', 'Gravity', 'Unit', 'Temperature °C', 'Note'],
        [new Date('2026-10-01T09:00:00Z'), 1.06, 'SG', 20, 'start'],
        [new Date('2026-10-03T09:00:00Z'), 1.04, 'sg', 21.5, { richText: [{ text: 'rich ' }, { text: 'text' }] }],
        [46299.375, 6.2, '°P', 20, 'serial date'],
        [new Date('2026-10-06T09:00:00Z'), { formula: '1+0.018', result: 1.018 }, 'SG', 20, 'formula'],
      ],
      { dateFormat: 'yyyy-mm-dd hh:mm' },
    );
    const preview = await upload(member, batchId, buf, 'readings.xlsx', { dryRun: true });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    const p = preview.body.preview;
    expect(p).toMatchObject({ fileType: 'xlsx', delimiter: null, totalRows: 4, validRows: 4, errorCount: 0 });
    expect(p.rows[0].takenAt).toBe('2026-10-01T09:00:00.000Z');
    expect(p.rows[1].note).toBe('rich text');
    expect(p.rows[2].takenAt).toBe('2026-10-04T09:00:00.000Z');
    expect(p.rows[3].gravity).toBe(1.018);
    const res = await upload(member, batchId, buf, 'readings.xlsx');
    expect(res.body).toEqual({ imported: 4, skipped: 0 });
    expect(await countReadings(ctx, batchId)).toBe(4);
  });

  it('imports the downloadable templates as they come', async () => {
    const csv = await member.get('/api/readings/template.csv');
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/readings-template\.csv/);
    const xlsx = await member.get('/api/readings/template.xlsx').buffer(true).parse(binary);
    expect(xlsx.status).toBe(200);
    const a = await upload(member, await newBatch(), csv.text, 'readings-template.csv');
    expect(a.body, JSON.stringify(a.body)).toEqual({ imported: 3, skipped: 0 });
    const b = await upload(member, await newBatch(), xlsx.body as Buffer, 'readings-template.xlsx');
    expect(b.body, JSON.stringify(b.body)).toEqual({ imported: 3, skipped: 0 });
    expect((await treasurer.get('/api/readings/template.csv')).status).toBe(403);
  });
});

describe('malformed rows: 422 naming row and column, nothing written', () => {
  const header = 'Taken at,Gravity,Unit,Temperature °C,Note';
  const cases: [name: string, line: string, column: string, path: string, message: RegExp][] = [
    ['a bad number', '2026-10-02 09:00,1.0x4,SG,20,', 'Gravity', 'gravity', /not a number/i],
    ['an unknown unit', '2026-10-02 09:00,1.044,Oechsle,20,', 'Unit', 'unit', /unknown unit/i],
    ['an unparseable date', 'next tuesday,1.044,SG,20,', 'Taken at', 'takenAt', /cannot read/i],
    ['an impossible date', '2026-02-30 09:00,1.044,SG,20,', 'Taken at', 'takenAt', /no day 30/i],
    ['a future date', '2099-10-02 09:00,1.044,SG,20,', 'Taken at', 'takenAt', /future/i],
    ['a gravity out of range', '2026-10-02 09:00,1.350,SG,20,', 'Gravity', 'gravity', /0\.98 to 1\.2/],
    ['a missing gravity', '2026-10-02 09:00,,SG,20,', 'Gravity', 'gravity', /missing/i],
    ['a temperature outside the correction’s range', '2026-10-02 09:00,1.044,SG,75,', 'Temperature °C', 'temperature', /0 to 60/],
    ['a bad temperature', '2026-10-02 09:00,1.044,SG,warm,', 'Temperature °C', 'temperature', /not a number/i],
    ['a duplicate of an existing reading', '2026-10-01 09:00,1.049,SG,20,', 'Taken at', 'takenAt', /duplicate/i],
    ['a duplicate within the file', '2026-10-03 09:00,1.040,SG,20,\n2026-10-03 09:00,1.039,SG,20,', 'Taken at', 'takenAt', /duplicate of row 3/i],
  ];

  let batchId: string;
  beforeAll(async () => {
    batchId = await newBatch(member, 'Malformed cases');
    // One existing reading, for the duplicate case.
    expect((await member.post(`/api/batches/${batchId}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' })).status).toBe(201);
  });

  for (const [name, line, column, path, message] of cases) {
    it(`rejects ${name}`, async () => {
      const lines = line.split('\n');
      const csv = [header, '2026-10-05 09:00,1.020,SG,20,good row', ...lines].join('\n');
      const res = await upload(member, batchId, csv, 'bad.csv');
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expect(res.headers['content-type']).toMatch(/problem\+json/);
      const errors = res.body.errors as ImportProblem[];
      expect(errors).toHaveLength(1);
      expect(errors[0]).toMatchObject({ row: 2 + lines.length, column, path });
      expect(errors[0]!.message).toMatch(message);
      expect(res.body.detail).toMatch(/nothing was imported/);
      expect(await countReadings(ctx, batchId)).toBe(1);
      // The preview marks the same problem on its row and still writes nothing.
      const preview = await upload(member, batchId, csv, 'bad.csv', { dryRun: true });
      expect(preview.status).toBe(200);
      const marked = preview.body.preview.rows.find((r: { row: number }) => r.row === 2 + lines.length);
      expect(marked.status).toBe('error');
      expect(marked.problems[0]).toMatchObject({ column, path });
      expect(preview.body.preview.rows[0].status).toBe('ok');
      expect(await countReadings(ctx, batchId)).toBe(1);
    });
  }

  it('lists every problem of a file with many, each with its row and column', async () => {
    const csv = [header, '2026-10-05 09:00,abc,SG,20,', 'bad date,1.020,XX,20,', '2026-10-07 09:00,1.010,SG,20,'].join('\n');
    const res = await upload(member, batchId, csv, 'bad.csv');
    expect(res.status).toBe(422);
    const got = (res.body.errors as ImportProblem[]).map((e) => [e.row, e.column]);
    expect(got).toEqual([
      [2, 'Gravity'],
      [3, 'Taken at'],
      [3, 'Unit'],
    ]);
    expect(await countReadings(ctx, batchId)).toBe(1);
  });

  it('rejects a quoted field that is never closed', async () => {
    const csv = [header, '2026-10-05 09:00,1.020,SG,20,"fine"', '2026-10-06 09:00,1.015,SG,20,"never closed', '2026-10-07 09:00,1.010,SG,20,'].join('\n');
    const res = await upload(member, batchId, csv, 'bad.csv');
    expect(res.status).toBe(422);
    const errors = res.body.errors as ImportProblem[];
    expect(errors.some((e) => e.row === 3 && /quoted field is not closed/i.test(e.message))).toBe(true);
    expect(await countReadings(ctx, batchId)).toBe(1);
  });

  it('rejects a mapping that is not JSON or names a column the file lacks', async () => {
    const notJson = await upload(member, batchId, goodCsv, 'readings.csv', { mapping: '{oops' });
    expect(notJson.status).toBe(422);
    expect(notJson.body.errors[0].path).toBe('mapping');
    const missing = await upload(member, batchId, goodCsv, 'readings.csv', { mapping: { takenAt: 'Timestamp', gravity: 'Gravity' } });
    expect(missing.status).toBe(422);
    expect(missing.body.errors[0]).toMatchObject({ path: 'mapping.takenAt', column: 'Timestamp' });
    expect(await countReadings(ctx, batchId)).toBe(1);
  });

  it('rejects a malformed XLSX row the same way', async () => {
    const buf = await xlsxOf([
      ['Taken at', 'Gravity'],
      [new Date('2026-10-09T09:00:00Z'), 1.02],
      [new Date('2026-10-10T09:00:00Z'), 'one point oh'],
    ]);
    const res = await upload(member, batchId, buf, 'bad.xlsx');
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ row: 3, column: 'Gravity', path: 'gravity' });
    expect(await countReadings(ctx, batchId)).toBe(1);
  });
});

describe('files that are not readings: 4xx problems, never 500', { timeout: 60_000 }, () => {
  let batchId: string;
  beforeAll(async () => {
    batchId = await newBatch(member, 'Junk cases');
  });

  const expectProblem = (res: { status: number; headers: Record<string, string>; body: { title?: string } }, status: number) => {
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.body.title).toBeTruthy();
  };

  it('an empty file is a 400', async () => {
    expectProblem(await upload(member, batchId, Buffer.alloc(0), 'empty.csv'), 400);
    expectProblem(await upload(member, batchId, '\uFEFF\r\n  \n', 'blank.csv'), 400);
  });

  it('a header with no rows is a 422', async () => {
    const res = await upload(member, batchId, 'Taken at,Gravity\n', 'header-only.csv');
    expectProblem(res, 422);
    expect(res.body.errors[0]).toMatchObject({ path: 'file', row: 2 });
    const xlsx = await upload(member, batchId, await xlsxOf([['Taken at', 'Gravity']]), 'header-only.xlsx');
    expectProblem(xlsx, 422);
  });

  it('binary junk is a 415', async () => {
    const junk = Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919) % 256));
    expectProblem(await upload(member, batchId, junk, 'readings.csv'), 415);
    expectProblem(await upload(member, batchId, junk, 'readings.bin', { contentType: 'application/octet-stream' }), 415);
  });

  it('a file named .xlsx that is not a workbook is a 415, and so is a workbook named .csv', async () => {
    expectProblem(await upload(member, batchId, goodCsv, 'readings.xlsx'), 415);
    const real = await xlsxOf([
      ['Taken at', 'Gravity'],
      [new Date('2026-10-09T09:00:00Z'), 1.02],
    ]);
    expectProblem(await upload(member, batchId, real, 'readings.csv'), 415);
    // A ZIP that is no workbook, and a workbook cut short.
    const zipOnly = Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.alloc(200, 1)]);
    expectProblem(await upload(member, batchId, zipOnly, 'readings.xlsx'), 415);
    expectProblem(await upload(member, batchId, real.subarray(0, Math.floor(real.length / 2)), 'readings.xlsx'), 415);
    // An old .xls workbook.
    const ole = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(512)]);
    expectProblem(await upload(member, batchId, ole, 'readings.xls'), 415);
    expect(await countReadings(ctx, batchId)).toBe(0);
  });

  it('no file, or a file in another field, is a 400', async () => {
    expectProblem(await member.post(`/api/batches/${batchId}/readings/import`).field('mapping', '{}'), 400);
    expectProblem(await member.post(`/api/batches/${batchId}/readings/import`).attach('upload', Buffer.from(goodCsv), 'readings.csv'), 400);
  });

  it(`a file over ${IMPORT_MAX_BYTES / 1024 / 1024} MiB is a 413`, async () => {
    const line = '2026-10-02 09:00,1.044,SG,20,padding padding padding padding\n';
    const big = Buffer.from(`Taken at,Gravity,Unit,Temperature °C,Note\n${line.repeat(Math.ceil((IMPORT_MAX_BYTES + 1024) / line.length))}`);
    expect(big.length).toBeGreaterThan(IMPORT_MAX_BYTES);
    expectProblem(await upload(member, batchId, big, 'big.csv'), 413);
    expect(await countReadings(ctx, batchId)).toBe(0);
  });

  it('only the owner and the brewer on duty may import', async () => {
    expect((await upload(member2, batchId, goodCsv, 'readings.csv')).status).toBe(404);
    expect((await upload(treasurer, batchId, goodCsv, 'readings.csv')).status).toBe(403);
    expect(await countReadings(ctx, batchId)).toBe(0);
  });
});
