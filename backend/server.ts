// One server process: listens and shuts down cleanly; the app itself is built in app.ts. main.ts starts one
// of these, or several sharing the port (node:cluster) with the migrations run once before them.
import cluster from 'node:cluster';
import type { Server } from 'node:http';
import type PgBoss from 'pg-boss';
import { pino } from 'pino';
import { createApp } from './app.ts';
import { loadConfig } from './config/env.ts';
import { createDb, isDatabaseUnavailable } from './db/database.ts';
import { migrateToLatest } from './db/migrate.ts';
import { pdfRenderPool } from './lib/pdf-render.ts';
import { importPool } from './modules/batches/import-pool.ts';
import { warmAuditRenderer } from './modules/sanitation/audit-report.ts';
import { systemClock } from './lib/clock.ts';
import { createQueue } from './lib/queue.ts';
import { startWorkers } from './workers.ts';

/** What shutdown must stop, set once each has started (the handlers below may run before then). */
const running: { server?: Server; queue?: PgBoss } = {};
let closing = false;

const config = loadConfig();
const log = pino({ level: config.LOG_LEVEL ?? 'info', base: { pid: process.pid } });

// A lost database connection is not a reason to stop: requests answer 503 meanwhile and the pools
// reconnect on their own once PostgreSQL is back.
process.on('unhandledRejection', (reason) => {
  if (isDatabaseUnavailable(reason)) log.warn({ err: reason }, 'database unavailable (unhandled rejection); still serving');
  else log.error({ err: reason }, 'unhandled promise rejection; still serving');
});
// Any other uncaught exception may have left the process in a state nobody planned for: log it and
// stop cleanly, so the supervisor (npm start, or the host's service manager) starts a fresh one.
// Failing to start (no database at all, say) ends the process with code 1 so the supervisor tries again.
process.on('uncaughtException', (err, origin) => {
  if (!running.server) {
    log.fatal({ err, origin }, 'could not start');
    process.exit(1);
  }
  if (isDatabaseUnavailable(err)) {
    log.warn({ err, origin }, 'database connection lost; still serving');
    return;
  }
  log.fatal({ err, origin }, 'uncaught exception; stopping so a fresh process takes over');
  void shutdown(1);
});

let lastPoolError = 0;
const { db, pool } = createDb(config.DATABASE_URL, config.poolSize, {
  onError: (err) => {
    // Every idle connection reports the same outage; once a few seconds is enough.
    if (Date.now() - lastPoolError < 5000) return;
    lastPoolError = Date.now();
    log.warn({ err: { message: err.message, code: (err as { code?: string }).code } }, 'database connection lost');
  },
});
if (config.MIGRATE_ON_START) await migrateToLatest(db, { quiet: true });
const queue = await createQueue(config.DATABASE_URL);
running.queue = queue;
const deps = { config, db, pool, queue, clock: systemClock };
if (config.WORKERS) await startWorkers(deps);
const app = createApp(deps);
running.server = app.listen(config.PORT, config.HOST, () => {
  // Several processes: the primary says so once all of them listen.
  if (!cluster.isWorker) console.log(`Cellarwright API and app on http://${config.HOST}:${config.PORT}`);
  // Start the PDF render threads now rather than on the first audit report, and lay out a few made-up ones.
  if (config.pdfWarmUpRounds > 0)
    warmAuditRenderer(pdfRenderPool, config.pdfWarmUpRounds).catch((err: Error) => console.error('PDF render thread did not start:', err.message));
  // And an import thread, so that the first upload does not wait for one to start.
  importPool.warm();
});

async function shutdown(code = 0) {
  if (closing) return;
  closing = true;
  // Never hang on the way out (a database that is down, a request that never ends).
  setTimeout(() => process.exit(code), 10_000).unref();
  running.server?.close();
  await pdfRenderPool.close().catch(() => undefined);
  await importPool.close().catch(() => undefined);
  await running.queue?.stop({ graceful: true, timeout: 5000 }).catch(() => undefined);
  await db.destroy().catch(() => undefined);
  process.exit(code);
}
process.on('SIGINT', () => void shutdown(0));
process.on('SIGTERM', () => void shutdown(0));
