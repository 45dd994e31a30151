// Reading import: 100,000 readings from CSV and from XLSX through the importer (parse, map, check,
// normalise, insert in one transaction), next to PostgreSQL COPY of the same rows. Each run is its
// own process so that its peak memory is its own. Prints times, ratios and peak memory; not a test.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { Readable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import ExcelJS from 'exceljs';
import { from as copyFrom } from 'pg-copy-streams';
import { systemClock } from '../lib/clock.ts';
import { createBatch, createMember } from '../../db/factories/index.ts';
import { createDb } from '../db/database.ts';
import { loadFermentationSettings } from '../modules/batches/figures.ts';
import { importReadings } from '../modules/batches/readings-import.service.ts';
import type { BatchRow } from '../modules/batches/batches.service.ts';
import { benchDatabase, peakRssMiB } from './bench-db.ts';
import { atMost, reportTarget } from './report.ts';

const ROWS = Number(process.env.BENCH_READINGS ?? 100_000);
const START = Date.UTC(2025, 0, 1);
const STEP_MS = 5 * 60_000;
const self = fileURLToPath(import.meta.url);

function reading(i: number) {
  const t = new Date(START + i * STEP_MS);
  const days = (i * STEP_MS) / 86_400_000;
  // Never above the first reading once corrected for temperature (the importer refuses that): the
  // first row has no noise and the warmest sample, later ones only lose gravity.
  const sg = 1.01 + 0.045 * Math.exp(-0.4 * days) - ((i * 7919) % 9) / 10_000;
  const temp = 20.9 - ((i * 31) % 20) / 10;
  return { t, sg: Math.round(sg * 10_000) / 10_000, temp: Math.round(temp * 10) / 10 };
}
const wall = (d: Date) => d.toISOString().slice(0, 19).replace('T', ' ');

async function writeFiles(dir: string) {
  const csvPath = path.join(dir, 'readings.csv');
  const lines = ['Taken at,Gravity,Unit,Temperature °C,Note'];
  for (let i = 0; i < ROWS; i += 1) {
    const r = reading(i);
    lines.push(`${wall(r.t)},${r.sg},SG,${r.temp},${i % 1000 === 0 ? '"checked, fine"' : ''}`);
  }
  fs.writeFileSync(csvPath, `${lines.join('\n')}\n`);

  const xlsxPath = path.join(dir, 'readings.xlsx');
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: xlsxPath, useSharedStrings: true, useStyles: true });
  const ws = wb.addWorksheet('Readings');
  ws.columns = [
    { header: 'Taken at', key: 't', width: 20, style: { numFmt: 'yyyy-mm-dd hh:mm:ss' } },
    { header: 'Gravity', key: 'g' },
    { header: 'Unit', key: 'u' },
    { header: 'Temperature °C', key: 'c' },
    { header: 'Note', key: 'n' },
  ];
  for (let i = 0; i < ROWS; i += 1) {
    const r = reading(i);
    ws.addRow({ t: r.t, g: r.sg, u: 'SG', c: r.temp, n: i % 1000 === 0 ? 'checked, fine' : '' }).commit();
  }
  ws.commit();
  await wb.commit();

  // What COPY loads: the same readings as rows of the reading table, already normalised.
  const copyPath = path.join(dir, 'copy.csv');
  const out: string[] = [];
  for (let i = 0; i < ROWS; i += 1) {
    const r = reading(i);
    out.push(`${r.t.toISOString()},${r.sg},${r.sg},sg,${r.temp},false,,import,${i % 1000 === 0 ? '"checked, fine"' : '""'}`);
  }
  fs.writeFileSync(copyPath, `${out.join('\n')}\n`);
  return { csvPath, xlsxPath, copyPath };
}

/** One measured run, in a child process: prints one JSON line. */
async function child(kind: string, url: string, batchId: string, file: string, actorId: string) {
  const { db, pool } = createDb(url, 4);
  const baseline = peakRssMiB();
  const t0 = performance.now();
  let rows: number;
  if (kind === 'copy') {
    const client = await pool.connect();
    try {
      await client.query('begin');
      const stream = client.query(
        copyFrom(
          `copy reading (taken_at, gravity_sg, entered_value, entered_unit, temperature_c, corrected, raw_sg, source, note, batch_id, created_by) from stdin with (format csv)`,
        ),
      );
      // The batch and actor ids go on every row.
      const tail = `,${batchId},${actorId}\n`;
      const lines = fs.readFileSync(file, 'utf8').split('\n').filter(Boolean);
      await pipeline(
        Readable.from(
          (function* () {
            for (const l of lines) yield l + tail;
          })(),
        ),
        stream,
      );
      await client.query('commit');
      rows = lines.length;
    } finally {
      client.release();
    }
  } else {
    const buffer = fs.readFileSync(file);
    const batch = (await db.selectFrom('batch').selectAll().where('id', '=', batchId).executeTakeFirstOrThrow()) as unknown as BatchRow;
    const settings = await loadFermentationSettings(db);
    const result = await importReadings(db, {
      batch,
      file: {
        buffer,
        originalname: path.basename(file),
        mimetype: kind.startsWith('xlsx') ? 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' : 'text/csv',
        size: buffer.length,
      },
      dryRun: kind.endsWith('-dry'),
      actor: { id: actorId, roles: ['member'] },
      settings,
      timeZone: 'UTC',
      now: systemClock.now(),
    });
    rows = kind.endsWith('-dry') ? (result.preview?.validRows ?? 0) : result.imported;
  }
  const ms = performance.now() - t0;
  const stored = await db
    .selectFrom('reading')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('batch_id', '=', batchId)
    .executeTakeFirstOrThrow();
  await db.destroy();
  console.log(JSON.stringify({ kind, rows, stored: Number(stored.n), ms, baselineMiB: baseline, peakMiB: peakRssMiB() }));
}

async function main() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cw-bench-readings-'));
  const bench = await benchDatabase('readings');
  try {
    const files = await writeFiles(dir);
    const member = await createMember(bench.db);
    const newBatch = async (name: string) => (await createBatch(bench.db, { ownerId: member.id, name, volumeLiters: 1000 })).id;
    const runs: { label: string; kind: string; file: string }[] = [
      { label: 'PostgreSQL COPY (normalised rows)', kind: 'copy', file: files.copyPath },
      { label: 'CSV import', kind: 'csv', file: files.csvPath },
      { label: 'CSV preview (?dryRun=1)', kind: 'csv-dry', file: files.csvPath },
      { label: 'XLSX import (streaming reader)', kind: 'xlsx', file: files.xlsxPath },
      { label: 'XLSX preview (?dryRun=1)', kind: 'xlsx-dry', file: files.xlsxPath },
    ];
    const results: { label: string; kind: string; rows: number; stored: number; ms: number; baselineMiB: number; peakMiB: number }[] = [];
    for (const run of runs) {
      const batchId = await newBatch(run.label);
      const r = spawnSync(process.execPath, [...process.execArgv, self, 'child', run.kind, bench.url, batchId, run.file, member.id], {
        encoding: 'utf8',
        env: process.env,
        maxBuffer: 10 * 1024 * 1024,
      });
      if (r.status !== 0) {
        console.error(r.stderr);
        throw new Error(`${run.label} failed`);
      }
      const line = r.stdout.trim().split('\n').pop()!;
      results.push({ label: run.label, ...(JSON.parse(line) as Omit<(typeof results)[number], 'label'>) });
    }
    const copyMs = results[0]!.ms;
    const sizes = { csv: fs.statSync(files.csvPath).size, xlsx: fs.statSync(files.xlsxPath).size };
    console.log(
      `\nReading import, ${ROWS.toLocaleString('en')} readings (CSV ${(sizes.csv / 1048576).toFixed(1)} MiB, XLSX ${(sizes.xlsx / 1048576).toFixed(1)} MiB), ${os.cpus().length} cores`,
    );
    console.log(
      'run'.padEnd(36),
      'rows'.padStart(8),
      'stored'.padStart(8),
      'time s'.padStart(8),
      'rows/s'.padStart(9),
      '× COPY'.padStart(7),
      'peak RSS MiB'.padStart(13),
      '(start)'.padStart(8),
    );
    for (const r of results) {
      console.log(
        r.label.padEnd(36),
        String(r.rows).padStart(8),
        String(r.stored).padStart(8),
        (r.ms / 1000).toFixed(2).padStart(8),
        String(Math.round(r.rows / (r.ms / 1000))).padStart(9),
        (r.ms / copyMs).toFixed(1).padStart(7),
        String(r.peakMiB).padStart(13),
        String(r.baselineMiB).padStart(8),
      );
    }
    const csv = results.find((x) => x.kind === 'csv')!;
    const times = csv.ms / copyMs;
    reportTarget({
      name: `Readings import (CSV, ${ROWS.toLocaleString('en')} rows) ÷ COPY of the same rows`,
      figure: times,
      unit: '×',
      target: 3,
      pass: atMost(times, 3),
    });
  } finally {
    await bench.drop();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === 'child') {
  const [, , , kind, url, batchId, file, actorId] = process.argv;
  await child(kind!, url!, batchId!, file!, actorId!);
} else {
  await main();
}
