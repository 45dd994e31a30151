// Listens and shuts down cleanly; the app itself is built in app.ts.
import { createApp } from './app.ts';
import { loadConfig } from './config/env.ts';
import { createDb } from './db/database.ts';
import { pdfRenderPool } from './lib/pdf-render.ts';
import { importPool } from './modules/batches/import-pool.ts';
import { warmAuditRenderer } from './modules/sanitation/audit-report.ts';
import { systemClock } from './lib/clock.ts';
import { createQueue } from './lib/queue.ts';
import { startWorkers } from './workers.ts';

const config = loadConfig();
const { db, pool } = createDb(config.DATABASE_URL, 20);
const queue = await createQueue(config.DATABASE_URL);
const deps = { config, db, pool, queue, clock: systemClock };
if (config.WORKERS) await startWorkers(deps);
const app = createApp(deps);
const server = app.listen(config.PORT, config.HOST, () => {
  console.log(`Cellarwright API and app on http://${config.HOST}:${config.PORT}`);
  // Start the PDF render thread now rather than on the first audit report.
  warmAuditRenderer().catch((err: Error) => console.error('PDF render thread did not start:', err.message));
  // And an import thread, so that the first upload does not wait for one to start.
  importPool.warm();
});

let closing = false;
async function shutdown() {
  if (closing) return;
  closing = true;
  server.close();
  await pdfRenderPool.close();
  await importPool.close();
  await queue.stop({ graceful: true, timeout: 5000 }).catch(() => undefined);
  await db.destroy();
  process.exit(0);
}
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);
