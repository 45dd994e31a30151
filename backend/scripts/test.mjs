// `npm test`: install what is missing, start a throwaway PostgreSQL on a free loopback port, build
// the front end and run every test (unit, API, browser). Stops what it started, even on failure.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawnSync, execFileSync } from 'node:child_process';
import { ensureDebian, ensureNodeModules, freePort, isRoot, log, root, runSync, startPostgres, vite } from './lib.mjs';

ensureNodeModules();
ensureDebian(['chromium'], '/usr/bin/chromium');
ensureDebian(['poppler-utils'], '/usr/bin/pdftotext');

let pg = null;
let tmp = null;
function cleanup() {
  if (pg) pg.stop();
  pg = null;
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
  tmp = null;
}
process.on('SIGINT', () => {
  cleanup();
  process.exit(130);
});

let status = 1;
try {
  const env = { NODE_ENV: 'test' };
  if (!process.env.DATABASE_URL) {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'cellarwright-test-'));
    if (isRoot) execFileSync('chown', ['postgres:postgres', tmp]);
    pg = await startPostgres({ dataDir: path.join(tmp, 'pg'), port: await freePort(), throwaway: true });
    env.DATABASE_URL = pg.url;
    log(`throwaway PostgreSQL on ${pg.url}`);
  }
  log('building the front end for the browser tests…');
  runSync(vite, ['build', '--logLevel', 'warn']);
  const results = path.join(root, 'test-artifacts', 'vitest-results.json');
  fs.mkdirSync(path.dirname(results), { recursive: true });
  fs.rmSync(results, { force: true });
  const extra = process.argv.slice(2);
  const r = spawnSync(
    path.join(root, 'node_modules', '.bin', 'vitest'),
    ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${results}`, ...extra],
    { cwd: root, stdio: 'inherit', env: { ...process.env, ...env } },
  );
  status = r.status ?? 1;
  if (fs.existsSync(results)) {
    const summary = JSON.parse(fs.readFileSync(results, 'utf8'));
    const skipped = (summary.numPendingTests ?? 0) + (summary.numTodoTests ?? 0);
    process.stdout.write(`\n${summary.numPassedTests} passed, ${summary.numFailedTests} failed${skipped ? `, ${skipped} skipped` : ''}\n`);
    if (summary.numTotalTests === 0) status = status || 1;
  }
} catch (err) {
  log(`test run failed: ${err.message}`);
  status = 1;
} finally {
  cleanup();
}
process.exit(status);
