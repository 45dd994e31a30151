// The primary of several server processes on one machine (node:cluster): runs the migrations once, starts
// `config.processes` copies of server.ts sharing the port, starts again any that stops on its own (after a
// pause that grows while they keep failing), and on SIGTERM or SIGINT stops them all and then itself.
import cluster, { type Worker } from 'node:cluster';
import { pino } from 'pino';
import type { Config } from '../config/env.ts';
import { createDb } from '../db/database.ts';
import { migrateToLatest } from '../db/migrate.ts';

export async function runPrimary(config: Config) {
  const log = pino({ level: config.LOG_LEVEL ?? 'info', base: { pid: process.pid, role: 'primary' } });
  if (config.MIGRATE_ON_START) {
    const { db } = createDb(config.DATABASE_URL, 1);
    try {
      await migrateToLatest(db, { quiet: true });
    } finally {
      await db.destroy();
    }
  }

  // The processes take connections from the shared socket themselves (the kernel hands each to one that is
  // waiting): with the primary handing them round, a connection given to a process at the moment it died was
  // left open and never answered.
  cluster.schedulingPolicy = cluster.SCHED_NONE;
  let closing = false;
  let listening = 0;
  let delay = 1000;
  const fork = () => cluster.fork({ MIGRATE_ON_START: 'false' });

  cluster.on('listening', () => {
    listening += 1;
    if (listening === config.processes) {
      console.log(`Cellarwright API and app on http://${config.HOST}:${config.PORT} (${config.processes} processes)`);
    }
  });
  cluster.on('exit', (worker: Worker, code, signal) => {
    if (closing) return;
    log.warn({ worker: worker.process.pid, code, signal }, `server process stopped; starting another in ${delay / 1000} s`);
    setTimeout(() => closing || fork(), delay);
    delay = Math.min(delay * 2, 15_000);
  });
  // A process that has served for a minute resets the pause.
  cluster.on('online', () => setTimeout(() => (delay = 1000), 60_000).unref());

  for (let i = 0; i < config.processes; i += 1) fork();

  const stop = (signal: NodeJS.Signals) => {
    if (closing) return;
    closing = true;
    const workers = Object.values(cluster.workers ?? {}).filter((w): w is Worker => w !== undefined);
    setTimeout(() => process.exit(0), 15_000).unref();
    let left = workers.length;
    if (left === 0) process.exit(0);
    for (const w of workers) {
      w.once('exit', () => {
        left -= 1;
        if (left === 0) process.exit(0);
      });
      w.process.kill(signal);
    }
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGTERM'));
}
