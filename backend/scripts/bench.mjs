// `npm run bench`: speed and memory figures (not tests). Starts a PostgreSQL under .data/bench-pg
// (fsync off) unless DATABASE_URL is set, then runs every backend/bench/*.bench.ts in turn; each prints its own figures
// and states its targets through backend/bench/report.ts, which appends them to the file in
// BENCH_REPORT. The run ends with a table of every target: figure, target, ratio, PASS or MISS.
// `npm run bench -- api explain` runs only the files whose names contain one of the words.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureDebian, ensureNodeModules, freePort, log, root, startPostgres, tsx } from './lib.mjs';

/** The summary table of the target lines in `file` (one JSON object a line). */
function summary(file, failed) {
  const lines = fs.existsSync(file) ? fs.readFileSync(file, 'utf8').split('\n').filter(Boolean) : [];
  const targets = lines.map((l) => JSON.parse(l));
  const num = (n) =>
    n === undefined || n === null ? '' : Number.isInteger(n) ? String(n) : Math.abs(n) >= 100 ? n.toFixed(0) : Math.abs(n) >= 10 ? n.toFixed(1) : n.toFixed(2);
  const rows = targets.map((t) => [t.pass ? 'PASS' : 'MISS', t.name, `${num(t.figure)} ${t.unit}`, `${num(t.target)} ${t.unit}`, num(t.ratio)]);
  const head = ['', 'target', 'figure', 'target value', 'ratio'];
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const fmt = (r) => r.map((c, i) => (i >= 2 ? c.padStart(widths[i]) : c.padEnd(widths[i]))).join('  ');
  console.log('\nSummary of the targets');
  console.log(fmt(head));
  console.log(widths.map((w) => '-'.repeat(w)).join('  '));
  for (const r of rows) console.log(fmt(r));
  const missed = targets.filter((t) => !t.pass).length;
  console.log(`${targets.length} targets: ${targets.length - missed} PASS, ${missed} MISS`);
  if (failed.length > 0) console.log(`benchmarks that failed to finish (their targets are missing above): ${failed.join(', ')}`);
}

/** Databases of benchmarks that stopped half-way in an earlier run. */
async function dropLeftovers(url) {
  const { default: pgLib } = await import('pg');
  const admin = new pgLib.Client({ connectionString: url });
  await admin.connect();
  const { rows } = await admin.query("select datname from pg_database where datname like 'cw\\_bench\\_%'");
  for (const r of rows) await admin.query(`drop database if exists "${r.datname}" with (force)`);
  await admin.end();
}

ensureNodeModules();
// The screens benchmark drives Debian's Chromium; the audit benchmark counts pages with poppler's pdfinfo.
ensureDebian(['chromium'], '/usr/bin/chromium');
ensureDebian(['poppler-utils'], '/usr/bin/pdfinfo');
let pg = null;
let status = 0;
const failed = [];
const reportFile = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'cellarwright-bench-report-')), 'targets.jsonl');
try {
  const env = { ...process.env, NODE_ENV: 'test', BENCH_REPORT: reportFile };
  if (!env.DATABASE_URL) {
    // Kept under .data/ between runs, so the benchmark data set (a template database) is built once.
    pg = await startPostgres({ dataDir: path.join(root, '.data', 'bench-pg'), port: await freePort(), throwaway: true });
    env.DATABASE_URL = pg.url;
    await dropLeftovers(pg.url);
  }
  const dir = path.join(root, 'backend', 'bench');
  const only = process.argv.slice(2);
  const files = fs
    .readdirSync(dir)
    .filter((f) => f.endsWith('.bench.ts'))
    .filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
    .sort();
  for (const f of files) {
    log(`bench ${f}`);
    const r = spawnSync(tsx, ['--expose-gc', path.join(dir, f)], { cwd: root, stdio: 'inherit', env });
    if (r.status !== 0) {
      status = 1;
      failed.push(f);
    }
  }
  if (files.length === 0) log('no benchmarks found in backend/bench/');
  else summary(reportFile, failed);
} finally {
  if (pg) pg.stop();
  fs.rmSync(path.dirname(reportFile), { recursive: true, force: true });
}
process.exit(status);
