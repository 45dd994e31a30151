// `npm start`: install what is missing, build the front end and the server, start PostgreSQL under
// .data/, migrate, seed the demo co-op once, start the local fakes of hosted services and serve the app,
// every program the built JavaScript run by plain node. SKIP_BUILD (`npm run dev`) builds nothing and
// runs the TypeScript sources through tsx instead.
import fs from 'node:fs';
import path from 'node:path';
import { ensureNodeModules, freePort, log, root, runSync, serverDir, startPostgres, superviseChild, tsx, withDatabase } from './lib.mjs';

ensureNodeModules();

const built = !process.env.SKIP_BUILD;
/** The command and arguments that run one of the server's programs (named by its source file). */
function program(source) {
  if (!built) return [tsx, [source]];
  return [process.execPath, ['--enable-source-maps', path.join(serverDir, source.replace(/\.ts$/, '.js'))]];
}

const started = [];
let pg = null;
let stopping = false;
async function stopAll(code = 0) {
  if (stopping) return;
  stopping = true;
  // Every child at once (none is started again from here on), then PostgreSQL once they are gone.
  await Promise.all(started.map((child) => child.stop('SIGTERM')));
  if (pg) {
    log('stopping PostgreSQL…');
    pg.stop();
  }
  process.exit(code);
}
process.on('SIGINT', () => stopAll(0));
process.on('SIGTERM', () => stopAll(0));

try {
  if (built) runSync(process.execPath, [path.join(root, 'backend', 'scripts', 'build.mjs')]);
  let databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) {
    const port = Number(process.env.PGPORT_LOCAL ?? (await freePort()));
    pg = await startPostgres({ dataDir: path.join(root, '.data', 'pg'), port });
    const { default: pgLib } = await import('pg');
    const admin = new pgLib.Client({ connectionString: pg.url });
    await admin.connect();
    const exists = await admin.query("select 1 from pg_database where datname = 'cellarwright'");
    if (exists.rowCount === 0) await admin.query('create database cellarwright');
    await admin.end();
    databaseUrl = withDatabase(pg.url, 'cellarwright');
    log(`PostgreSQL on ${databaseUrl}`);
  }
  const appPort = Number(process.env.PORT ?? 3000);
  const smtpPort = Number(process.env.SMTP_PORT ?? (await freePort()));
  const paymentsPort = Number(process.env.PAYMENTS_FAKE_PORT ?? (await freePort()));
  const env = {
    DATABASE_URL: databaseUrl,
    NODE_ENV: process.env.NODE_ENV ?? 'development',
    PORT: String(appPort),
  };
  const fakes = !process.env.SMTP_HOST;
  if (fakes) Object.assign(env, { SMTP_HOST: '127.0.0.1', SMTP_PORT: String(smtpPort) });
  env.PAYMENTS_FAKE_PORT = String(paymentsPort);

  log('migrating…');
  runSync(...program('db/migrate.ts'), env);
  log('seeding the demo co-op (once)…');
  runSync(...program('db/seed.ts'), env);

  // Each child is started again if it stops on its own (logged, with a growing pause); only Ctrl-C
  // or SIGTERM stops everything.
  if (fakes) started.push(superviseChild('SMTP fake', ...program('backend/fakes/smtp-fake.ts'), env));
  if (fs.existsSync(path.join(root, 'backend/fakes/payments-fake.ts'))) {
    started.push(superviseChild('payment provider fake', ...program('backend/fakes/payments-fake.ts'), env));
  }
  started.push(superviseChild('server', ...program('backend/main.ts'), env));
  // Announce once the server answers its health check.
  const deadline = Date.now() + 60_000;
  for (;;) {
    const ok = await fetch(`http://127.0.0.1:${appPort}/api/health`).then(
      (r) => r.ok,
      () => false,
    );
    if (ok || Date.now() > deadline) break;
    await new Promise((r) => setTimeout(r, 300));
  }
  log(`Cellarwright is on http://127.0.0.1:${appPort}`);
  log(
    'demo accounts (password cellar-demo): admin@example.org, treasurer@example.org, brewer@example.org, member@example.org (and member2@ … member24@example.org)',
  );
  log('Ctrl-C stops everything this started.');
} catch (err) {
  log(`start failed: ${err.message}`);
  stopAll(1);
}
