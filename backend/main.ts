// Starts Cellarwright: one server process (server.ts), or, when `processes` (WEB_CONCURRENCY; one per core up
// to four in production) is more than one, a primary that migrates once and keeps that many server processes
// sharing the port. Sessions, rate limits, jobs and locks live in PostgreSQL, so the processes share nothing
// else, exactly as instances behind a load balancer do.
import cluster from 'node:cluster';
import { loadConfig } from './config/env.ts';

const config = loadConfig();
if (cluster.isPrimary && config.processes > 1) {
  const { runPrimary } = await import('./lib/process-cluster.ts');
  await runPrimary(config);
} else {
  await import('./server.ts');
}
