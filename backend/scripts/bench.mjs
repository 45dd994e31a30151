// `npm run bench`: speed and memory figures (not tests). Starts a throwaway PostgreSQL unless
// DATABASE_URL is set, then runs every backend/bench/*.bench.ts in turn; each prints its own figures.
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureNodeModules, freePort, isRoot, log, root, startPostgres, tsx } from './lib.mjs';

ensureNodeModules();
let pg = null;
let tmp = null;
let status = 0;
try {
  const env = { ...process.env, NODE_ENV: 'test' };
  if (!env.DATABASE_URL) {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'cellarwright-bench-'));
    if (isRoot) execFileSync('chown', ['postgres:postgres', tmp]);
    pg = await startPostgres({ dataDir: path.join(tmp, 'pg'), port: await freePort(), throwaway: true });
    env.DATABASE_URL = pg.url;
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
    if (r.status !== 0) status = 1;
  }
  if (files.length === 0) log('no benchmarks found in backend/bench/');
} finally {
  if (pg) pg.stop();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
}
process.exit(status);
