import zlib from 'node:zlib';
import ExcelJS from 'exceljs';
import type { FermentationSettings } from '../../shared/schemas/batches.ts';
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { IMPORT_MAX_BYTES } from '../../backend/modules/batches/batches.routes.ts';
import { loadFermentationSettings } from '../../backend/modules/batches/figures.ts';
import type { PrepareInput } from '../../backend/modules/batches/import-check.ts';
import { IMPORT_MAX_CELLS, IMPORT_MAX_COLUMNS, IMPORT_MAX_ROWS, IMPORT_ZIP_LIMITS } from '../../backend/modules/batches/import-file.ts';
import { ImportPool, importPool } from '../../backend/modules/batches/import-pool.ts';
import { createBatch } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { countReadings } from '../helpers/counts.ts';
import { TEST_NOW } from '../helpers/time.ts';
import { makeZip } from '../helpers/zip.ts';

// The limits of one import: every one is a 413 problem that names it, nothing is written, and the
// instance keeps answering other requests while the largest file it takes is being read.

let ctx: TestContext;
let member: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  member = await ctx.signIn('member@example.org');
});

async function newBatch(name = 'Limits batch') {
  return (await createBatch(ctx.db, { ownerId: member.user.id, name, style: 'Pale ale', volumeLiters: 23 })).id;
}

const importUrl = (batchId: string, dryRun = false) => `/api/batches/${batchId}/readings/import${dryRun ? '?dryRun=1' : ''}`;

function upload(batchId: string, content: string | Buffer, filename: string) {
  const buffer = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
  return member.post(importUrl(batchId)).attach('file', buffer, {
    filename,
    contentType: filename.endsWith('.xlsx') ? 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' : 'text/csv',
  });
}

type Res = { status: number; headers: Record<string, string>; body: { title?: string; detail?: string; status?: number } };
function expectProblem(res: Res, status: number, title: string, detail?: string | RegExp) {
  expect(res.status, JSON.stringify(res.body).slice(0, 500)).toBe(status);
  expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  expect(res.body).toMatchObject({ status, title });
  if (typeof detail === 'string') expect(res.body.detail).toBe(detail);
  else if (detail) expect(res.body.detail).toMatch(detail);
}

const goodCsv = 'Taken at,Gravity,Unit\n2026-10-01 09:00,1.050,SG\n2026-10-02 09:00,1.040,SG\n';

/** Readings a member would send: one every five minutes from the start of October 2025, falling from the OG 1.049 (never above it). */
function readingsCsv(rows: number) {
  const lines = ['Taken at,Gravity,Unit,Temperature °C,Note'];
  const start = Date.UTC(2025, 9, 1);
  for (let i = 0; i < rows; i += 1) lines.push(`${new Date(start + i * 300_000).toISOString().slice(0, 16).replace('T', ' ')},1.0${49 - (i % 40)},SG,20,`);
  return `${lines.join('\n')}\n`;
}

/** The template's headers over rows of junk in every cell: every row is read, checked and refused. */
function junkCsv(rows: number, columns: number) {
  const named = ['Taken at', 'Gravity', 'Unit', 'Temperature °C', 'Note'];
  const lines = [Array.from({ length: columns }, (_, c) => named[c] ?? `Column ${c}`).join(',')];
  let seed = 7;
  const word = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return seed.toString(36).slice(0, 7);
  };
  for (let i = 0; i < rows; i += 1) lines.push(Array.from({ length: columns }, word).join(','));
  return `${lines.join('\n')}\n`;
}

describe('limits on the file: a 413 problem naming the limit, nothing written', { timeout: 120_000 }, () => {
  it(`more than ${IMPORT_MAX_ROWS.toLocaleString('en')} rows`, async () => {
    const batchId = await newBatch();
    const csv = `Taken at\n${'x\n'.repeat(IMPORT_MAX_ROWS + 1)}`;
    const detail = `One import takes at most ${IMPORT_MAX_ROWS.toLocaleString('en')} rows of readings; split the file.`;
    expectProblem(await upload(batchId, csv, 'rows.csv'), 413, 'Too many rows', detail);
    // 150,000 rows of junk in 600 KB, and a workbook whose one data row sits far below its header.
    expectProblem(await upload(batchId, `a;b\n${'1;\n'.repeat(150_000)}`, 'junk.csv'), 413, 'Too many rows', detail);
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Readings');
    ws.addRow(['Taken at', 'Gravity']);
    ws.getRow(IMPORT_MAX_ROWS + 5).values = [new Date('2026-10-01T09:00:00Z'), 1.05];
    expectProblem(await upload(batchId, Buffer.from(await wb.xlsx.writeBuffer()), 'far.xlsx'), 413, 'Too many rows', detail);
    // Exactly the limit is taken (a preview: every row is read and checked).
    const atLimit = await member.post(importUrl(batchId, true)).attach('file', Buffer.from(readingsCsv(IMPORT_MAX_ROWS)), 'season.csv');
    expect(atLimit.status, JSON.stringify(atLimit.body).slice(0, 300)).toBe(200);
    expect(atLimit.body.preview).toMatchObject({ totalRows: IMPORT_MAX_ROWS, validRows: IMPORT_MAX_ROWS, errorCount: 0 });
    expect(await countReadings(ctx, batchId)).toBe(0);
  });

  it(`more than ${IMPORT_MAX_COLUMNS} columns in a row, or more than ${IMPORT_MAX_CELLS.toLocaleString('en')} cells`, async () => {
    const batchId = await newBatch();
    const wide = `${Array.from({ length: IMPORT_MAX_COLUMNS + 1 }, (_, i) => `c${i}`).join(',')}\n1,2\n`;
    expectProblem(
      await upload(batchId, wide, 'wide.csv'),
      413,
      'Too many columns',
      `Row 1 has more than ${IMPORT_MAX_COLUMNS} columns, the most one import takes; a readings file needs five.`,
    );
    const rows = Math.ceil(IMPORT_MAX_CELLS / IMPORT_MAX_COLUMNS) + 1;
    const cells = `${'a,'.repeat(IMPORT_MAX_COLUMNS - 1)}a\n`.repeat(rows);
    expectProblem(
      await upload(batchId, cells, 'cells.csv'),
      413,
      'Too many cells',
      `One import takes at most ${IMPORT_MAX_CELLS.toLocaleString('en')} cells (rows × columns); leave out columns you do not import, or split the file.`,
    );
    const wb = new ExcelJS.Workbook();
    wb
      .addWorksheet('Readings')
      .getRow(1)
      .getCell(IMPORT_MAX_COLUMNS + 50).value = 'far right';
    expectProblem(await upload(batchId, Buffer.from(await wb.xlsx.writeBuffer()), 'wide.xlsx'), 413, 'Too many columns', /^Row 1 has more than 100 columns/);
    expect(await countReadings(ctx, batchId)).toBe(0);
  });

  it(`a workbook of more than ${IMPORT_ZIP_LIMITS.maxEntries} entries, refused from its directory in well under a second`, async () => {
    const batchId = await newBatch();
    const detail = `The workbook holds more than ${IMPORT_ZIP_LIMITS.maxEntries} entries, the most one import takes (a readings workbook holds a few dozen). Save it again as .xlsx, or export it as CSV.`;
    const tiny = Array.from({ length: 20_000 }, (_, i) => ({ name: `xl/media/e${i}.xml`, data: Buffer.from('<a/>'), deflate: false }));
    const bomb = makeZip(tiny);
    expect(bomb.length).toBeGreaterThan(1_000_000);
    const t0 = performance.now();
    expectProblem(await upload(batchId, bomb, 'entries.xlsx'), 413, 'Too many workbook entries', detail);
    const ms = performance.now() - t0;
    expect(ms).toBeLessThan(5_000); // generous: the refusal itself reads only the directory
    expectProblem(await upload(batchId, makeZip(tiny.slice(0, IMPORT_ZIP_LIMITS.maxEntries + 1)), 'entries.xlsx'), 413, 'Too many workbook entries', detail);
    expect(await countReadings(ctx, batchId)).toBe(0);
  });

  it('a workbook that unpacks to more than the limit, or far beyond its packed size', async () => {
    const batchId = await newBatch();
    // Entries of a MiB of zeros each, just under the size from which the ratio is checked.
    const mib = Buffer.alloc(IMPORT_ZIP_LIMITS.ratioFloorBytes);
    const packed = zlib.deflateRawSync(mib);
    const count = Math.floor(IMPORT_ZIP_LIMITS.maxUncompressedBytes / mib.length) + 1;
    expect(count).toBeLessThan(IMPORT_ZIP_LIMITS.maxEntries);
    const large = makeZip(Array.from({ length: count }, (_, i) => ({ name: `xl/worksheets/sheet${i + 1}.xml`, data: mib, packed })));
    expectProblem(
      await upload(batchId, large, 'large.xlsx'),
      413,
      'Workbook too large',
      `The workbook unpacks to more than ${IMPORT_ZIP_LIMITS.maxUncompressedBytes / 1048576} MiB, the most one import takes; split the readings into smaller files.`,
    );
    const zeros = Buffer.alloc(8 * 1024 * 1024);
    const bomb = makeZip([{ name: 'xl/worksheets/sheet1.xml', data: zeros }]);
    const ratio = Math.round(zeros.length / (bomb.length - 2 * 'xl/worksheets/sheet1.xml'.length - 30 - 46 - 22));
    expectProblem(
      await upload(batchId, bomb, 'bomb.xlsx'),
      413,
      'Suspicious workbook',
      `The workbook entry “xl/worksheets/sheet1.xml” unpacks to ${ratio.toLocaleString('en')} times its packed size; a workbook unpacks to at most ${IMPORT_ZIP_LIMITS.maxRatio} times. Save it again as .xlsx, or export it as CSV.`,
    );
    expect(await countReadings(ctx, batchId)).toBe(0);
  });

  it('a workbook whose entries do not match its directory is unreadable, in our words', async () => {
    const batchId = await newBatch();
    const detail = 'The file is not a readable XLSX workbook (it is damaged or cut short). Save it again as .xlsx, or export it as CSV.';
    // A local entry that the directory does not list, in front of those it does.
    const hidden = makeZip([
      { name: 'xl/worksheets/sheet1.xml', data: Buffer.from('<worksheet/>'), unlisted: true },
      { name: '[Content_Types].xml', data: Buffer.from('<Types/>') },
    ]);
    expectProblem(await upload(batchId, hidden, 'hidden.xlsx'), 415, 'Unsupported file', detail);
    // A directory that is right but packed data that is not deflate at all.
    const garbled = makeZip([
      { name: '[Content_Types].xml', data: Buffer.from('<Types/>'), packed: Buffer.from('definitely not deflate data, just text') },
      { name: 'xl/workbook.xml', data: Buffer.from('<workbook/>') },
    ]);
    const res = await upload(batchId, garbled, 'garbled.xlsx');
    expectProblem(res, 415, 'Unsupported file', detail);
    const real = Buffer.from(
      await (() => {
        const wb = new ExcelJS.Workbook();
        wb.addWorksheet('R').addRow(['Taken at', 'Gravity']);
        return wb.xlsx.writeBuffer();
      })(),
    );
    expectProblem(await upload(batchId, real.subarray(0, real.length - 40), 'cut.xlsx'), 415, 'Unsupported file', detail);
    expect(await countReadings(ctx, batchId)).toBe(0);
  });
});

describe('limits on the thread: time and memory', { timeout: 180_000 }, () => {
  it('a file that takes longer than the time limit is a 413; its thread is replaced and the next file is read', async () => {
    const batchId = await newBatch();
    const limit = importPool.timeLimitMs;
    importPool.timeLimitMs = 300;
    try {
      const res = await upload(batchId, readingsCsv(60_000), 'slow.csv');
      expectProblem(
        res,
        413,
        'File takes too long to read',
        'Reading the file took longer than 0.3 seconds, the most one import may take; split it into smaller files.',
      );
    } finally {
      importPool.timeLimitMs = limit;
    }
    expect(await countReadings(ctx, batchId)).toBe(0);
    const next = await upload(batchId, goodCsv, 'good.csv');
    expect(next.status, JSON.stringify(next.body)).toBe(200);
    expect(next.body).toEqual({ imported: 2, skipped: 0 });
  });

  let settings: FermentationSettings;
  beforeAll(async () => {
    settings = await loadFermentationSettings(ctx.db);
  });
  const input = (csv: string): PrepareInput => {
    const bytes = Buffer.from(csv);
    return {
      file: { bytes, originalname: 'r.csv', mimetype: 'text/csv', size: bytes.length },
      timeZone: 'UTC',
      now: Date.parse(TEST_NOW),
      existingTimes: [],
      first: null,
      settings,
      dryRun: false,
    };
  };

  it('a file that needs more memory than a thread may use is a 413, and the pool carries on', async () => {
    const pool = new ImportPool({ size: 1, memoryLimitMb: 64 });
    try {
      const small = await pool.run(input(goodCsv));
      expect(small.readings.count).toBe(2);
      const big = pool.run(input(junkCsv(IMPORT_MAX_ROWS, IMPORT_MAX_CELLS / IMPORT_MAX_ROWS - 1)));
      await expect(big).rejects.toMatchObject({
        status: 413,
        title: 'File needs too much memory',
        detail: 'Reading the file needed more than 64 MiB of memory, the most one import may use; split it into smaller files.',
      });
      expect((await pool.run(input(goodCsv))).readings.count).toBe(2);
    } finally {
      await pool.close();
    }
  });

  it('more files waiting for a thread than the pool takes is a 503 to retry later', async () => {
    const pool = new ImportPool({ size: 1, maxWaiting: 1 });
    try {
      const running = pool.run(input(readingsCsv(5_000)));
      const waiting = pool.run(input(goodCsv));
      await expect(pool.run(input(goodCsv))).rejects.toMatchObject({
        status: 503,
        title: 'Busy',
        detail: '1 import is waiting to be read; try again in a minute.',
      });
      expect((await running).readings.count).toBe(5_000);
      expect((await waiting).readings.count).toBe(2);
      expect((await pool.run(input(goodCsv))).readings.count).toBe(2);
    } finally {
      await pool.close();
    }
  });
});

describe('the instance keeps answering while the largest file it takes is read', { timeout: 180_000 }, () => {
  it('answers GET /api/health within 100 ms, again and again, before the import is done', async () => {
    const batchId = await newBatch();
    // As many rows and cells as one import takes, every cell junk: all of it is read and checked.
    const hostile = Buffer.from(junkCsv(IMPORT_MAX_ROWS, IMPORT_MAX_CELLS / IMPORT_MAX_ROWS - 1));
    expect(hostile.length).toBeLessThan(IMPORT_MAX_BYTES);
    const started = new Promise<void>((resolve) => importPool.events.once('start', () => resolve()));
    let finished = false;
    const importing = upload(batchId, hostile, 'hostile.csv').then((res) => {
      finished = true;
      return res;
    });
    await started;
    const latencies: number[] = [];
    for (let i = 0; i < 10; i += 1) {
      const t0 = performance.now();
      const health = await request(ctx.app).get('/api/health');
      latencies.push(performance.now() - t0);
      expect(health.status).toBe(200);
      await new Promise((r) => setTimeout(r, 50));
    }
    const stillReading = !finished;
    const res = await importing;
    expect(stillReading, `the import ended before the polls did (${latencies.map(Math.round).join(', ')} ms)`).toBe(true);
    // A file read on the request thread stalls every poll for seconds. On a busy machine (the suite runs
    // files in parallel on two cores) a few polls may wait for the CPU, so the typical answer is what is
    // held to 100 ms: the median, with most answers within it and none near a stall.
    const sorted = [...latencies].sort((a, b) => a - b);
    const median = (sorted[4]! + sorted[5]!) / 2;
    const said = `health answered in ${latencies.map(Math.round).join(', ')} ms`;
    expect(median, said).toBeLessThanOrEqual(100);
    expect(latencies.filter((ms) => ms > 100).length, said).toBeLessThanOrEqual(3);
    expect(sorted[9]!, said).toBeLessThan(2_000);
    expectProblem(res, 422, 'Validation failed', new RegExp(`problems in ${IMPORT_MAX_ROWS} rows; nothing was imported\\.$`));
    expect(await countReadings(ctx, batchId)).toBe(0);
  });
});

describe('malformed uploads are 400 problems, never 500', () => {
  let batchId: string;
  beforeAll(async () => {
    batchId = await newBatch('Malformed uploads');
  });
  const send = (contentType: string, body: string | Buffer) => member.post(importUrl(batchId)).set('Content-Type', contentType).send(body);
  const part = (field: string, filename: string, content: string) =>
    `--XYZ\r\nContent-Disposition: form-data; name="${field}"; filename="${filename}"\r\nContent-Type: text/csv\r\n\r\n${content}\r\n`;

  it('no boundary, a body cut short, a file in another field, no file at all', async () => {
    const noBoundary = await send('multipart/form-data', part('file', 'r.csv', goodCsv));
    expectProblem(noBoundary, 400, 'Bad request', /not a complete multipart form/);
    const cut = await send('multipart/form-data; boundary=XYZ', part('file', 'r.csv', goodCsv).slice(0, 120));
    expectProblem(cut, 400, 'Bad request', /not a complete multipart form/);
    const garbled = await send('multipart/form-data; boundary=XYZ', Buffer.from('--XYZ\r\nthis is no header\r\n\r\n--XYZ--'));
    expect(garbled.status).toBe(400);
    const wrongField = await send('multipart/form-data; boundary=XYZ', `${part('upload', 'r.csv', goodCsv)}--XYZ--\r\n`);
    expectProblem(wrongField, 400, 'Bad request', 'A file came in the form field “upload”. Send the readings file in the multipart form field “file”.');
    const two = await send('multipart/form-data; boundary=XYZ', `${part('file', 'a.csv', goodCsv)}${part('file', 'b.csv', goodCsv)}--XYZ--\r\n`);
    expectProblem(two, 400, 'Bad request', 'Send one file only. Send the readings file in the multipart form field “file”.');
    const none = await send('multipart/form-data; boundary=XYZ', '--XYZ--\r\n');
    expectProblem(none, 400, 'Bad request', 'Send the readings file in the multipart form field “file”.');
    const json = await member.post(importUrl(batchId), { file: goodCsv });
    expectProblem(json, 400, 'Bad request', 'Send the readings file in the multipart form field “file”.');
    expect(await countReadings(ctx, batchId)).toBe(0);
    // The route still takes a good file afterwards.
    expect((await upload(batchId, goodCsv, 'r.csv')).body).toEqual({ imported: 2, skipped: 0 });
  });

  it(`a file over ${IMPORT_MAX_BYTES / 1048576} MiB names the limit`, async () => {
    const big = Buffer.alloc(IMPORT_MAX_BYTES + 1, 'a');
    expectProblem(
      await upload(batchId, big, 'big.csv'),
      413,
      'File too large',
      `One import takes a file of at most ${IMPORT_MAX_BYTES / 1048576} MiB; split the readings into smaller files.`,
    );
  });
});
