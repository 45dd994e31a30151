// API throughput on the benchmark data set. Builds the app (`npm run build`), starts the built server
// (`node dist/server/backend/main.js`, as `npm start` runs it, in production mode), signs in, and drives
// with autocannon at 50 connections for BENCH_SECONDS (10) each:
//   (a) a member's bookings list, one month, 50 a page   (b) the equipment list, as an admin
// against two floors started beside it as their own processes:
//   (c) a bare node:http + pg server running the same SQL the app ran for that request (caught from the
//       app in process) and answering JSON of the same rows   (d) a bare node:http server answering the
//       app's own response bytes from memory.
// Prints requests/s, p50, p99 and the CPU a request took in the server and in PostgreSQL for each, the ratios app ÷ (c) and app ÷ (d), and a per-step cost of one
// request alone (framework, session and user, the list itself). Figures only; not a test.
// BENCH_SECONDS sets each run's length, BENCH_CPU_PROF a folder for the app's CPU profile (node --cpu-prof).
import { type ChildProcess, execFileSync, spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import autocannon from 'autocannon';
import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import request from 'supertest';
import { createApp } from '../app.ts';
import { loadConfig } from '../config/env.ts';
import type { DB } from '../db/schema.ts';
import { systemClock } from '../lib/clock.ts';
import { createQueue } from '../lib/queue.ts';
import { benchDataset } from './dataset.ts';
import { cpuDuring, parentOf, waitForQuiet } from './process-cpu.ts';
import { atLeast, atMost, reportTarget } from './report.ts';

const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const CONNECTIONS = 50;
const PORTS = { app: 4101, sql: 4102, bytes: 4103 };
const self = fileURLToPath(import.meta.url);
const root = path.resolve(path.dirname(self), '../..');

interface Caught {
  sql: string;
  parameters: unknown[];
}
const camel = (k: string) => k.replace(/_([a-z])/g, (_, c: string) => c.toUpperCase());

/** (c): runs the caught queries side by side (as the list does) and answers `{ items, total, page, pageSize }`. */
function serveSql(url: string, port: number, plans: Record<string, Caught[]>) {
  const pool = new pg.Pool({ connectionString: url, max: 10 });
  http
    .createServer((req, res) => {
      const queries = plans[req.url ?? ''];
      if (!queries) return res.writeHead(404).end();
      Promise.all(queries.map((q) => pool.query(q.sql, q.parameters))).then(
        (results) => {
          const counted = results.find((r) => r.rows.length === 1 && 'total' in (r.rows[0] as object));
          const listed = results.filter((r) => r !== counted).sort((a, b) => b.rows.length - a.rows.length)[0];
          const items = (listed?.rows ?? []).map((row: Record<string, unknown>) => Object.fromEntries(Object.entries(row).map(([k, v]) => [camel(k), v])));
          const body = JSON.stringify({
            items,
            total: Number((counted?.rows[0] as { total?: number } | undefined)?.total ?? items.length),
            page: 1,
            pageSize: 50,
          });
          res.writeHead(200, { 'content-type': 'application/json; charset=utf-8' }).end(body);
        },
        (err: Error) => res.writeHead(500).end(err.message),
      );
    })
    .listen(port, '127.0.0.1', () => console.log('ready'));
}

/** (d): the app's own answers, from memory. */
function serveBytes(port: number, bodies: Record<string, string>) {
  const buffers = Object.fromEntries(Object.entries(bodies).map(([k, v]) => [k, Buffer.from(v)]));
  http
    .createServer((req, res) => {
      const body = buffers[req.url ?? ''];
      if (!body) return res.writeHead(404).end();
      res.writeHead(200, { 'content-type': 'application/json; charset=utf-8', 'content-length': body.length }).end(body);
    })
    .listen(port, '127.0.0.1', () => console.log('ready'));
}

function startChild(args: string[], env: NodeJS.ProcessEnv, ready: RegExp): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn(args[0]!, args.slice(1), { cwd: root, env, stdio: ['ignore', 'pipe', 'inherit'] });
    let seen = '';
    const onData = (d: Buffer) => {
      seen += d.toString();
      if (ready.test(seen)) {
        child.stdout.off('data', onData);
        child.stdout.resume(); // the app's request log: read and dropped
        resolve(child);
      }
    };
    child.stdout.on('data', onData);
    child.on('exit', (code) => reject(new Error(`${args.join(' ')} stopped (${code}): ${seen.slice(-2000)}`)));
  });
}

function drive(url: string, headers: Record<string, string> = {}) {
  return new Promise<autocannon.Result>((resolve, reject) => {
    autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers }, (err, result) => (err ? reject(err as Error) : resolve(result)));
  });
}

/** Median time of `n` requests one after another. */
async function alone(url: string, headers: Record<string, string>, n = 100) {
  const times: number[] = [];
  for (let i = 0; i < n; i += 1) {
    const t0 = performance.now();
    const res = await fetch(url, { headers });
    await res.arrayBuffer();
    times.push(performance.now() - t0);
  }
  return times.sort((a, b) => a - b)[Math.floor(n / 2)]!;
}

async function main() {
  execFileSync(process.execPath, [path.join(root, 'backend/scripts/build.mjs')], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
  const bench = await benchDataset('api');
  const children: ChildProcess[] = [];
  const queue = await createQueue(bench.url);
  try {
    const from = new Date(Date.now() - 15 * 86_400_000).toISOString();
    const to = new Date(Date.now() + 15 * 86_400_000).toISOString();
    const lists = {
      bookings: { who: 'member@example.org', path: `/api/bookings?page=1&pageSize=50&from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}` },
      equipment: { who: 'admin@example.org', path: '/api/equipment?page=1&pageSize=50' },
    };

    // The SQL each list runs, caught from the app in process (the sign-in's own user lookup left out).
    const caught: Caught[] = [];
    const db = new Kysely<DB>({
      dialect: new PostgresDialect({ pool: bench.pool }),
      log: (e) => {
        if (e.level === 'query') caught.push({ sql: e.query.sql, parameters: [...e.query.parameters] });
      },
    });
    const inProcess = createApp({ config: loadConfig({ NODE_ENV: 'test', DATABASE_URL: bench.url }), db, pool: bench.pool, queue, clock: systemClock });
    const plans: Record<string, Caught[]> = {};
    for (const [name, list] of Object.entries(lists)) {
      const agent = request.agent(inProcess);
      await agent.post('/api/auth/login').send({ email: list.who, password: 'cellar-demo' }).expect(200);
      caught.length = 0;
      await agent.get(list.path).expect(200);
      plans[list.path] = caught.filter((q) => !/from "app_user" where "id" = \$1/.test(q.sql));
      console.log(`  ${name}: ${plans[list.path]!.length} queries a request besides the sign-in's`);
    }

    // The built app, as production runs it (its request log at info, read and dropped).
    const secret = () => randomBytes(24).toString('hex');
    const env = {
      ...process.env,
      NODE_ENV: 'production',
      DATABASE_URL: bench.url,
      PORT: String(PORTS.app),
      HOST: '127.0.0.1',
      COOKIE_SECURE: 'false',
      SESSION_SECRET: secret(),
      STRIPE_SECRET_KEY: `sk_test_${secret()}`,
      STRIPE_WEBHOOK_SECRET: `whsec_${secret()}`,
    };
    const profileDir = process.env.BENCH_CPU_PROF ? path.resolve(process.env.BENCH_CPU_PROF) : null;
    const nodeArgs = profileDir ? ['--cpu-prof', '--cpu-prof-dir', profileDir] : [];
    children.push(await startChild([process.execPath, ...nodeArgs, path.join(root, 'dist/server/backend/main.js')], env, /Cellarwright API and app on/));
    const base = `http://127.0.0.1:${PORTS.app}`;
    const cookies: Record<string, string> = {};
    const bodies: Record<string, string> = {};
    for (const list of Object.values(lists)) {
      const res = await fetch(`${base}/api/auth/login`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email: list.who, password: 'cellar-demo' }),
      });
      if (!res.ok) throw new Error(`sign-in as ${list.who}: ${res.status} ${await res.text()}`);
      cookies[list.path] = res.headers
        .getSetCookie()
        .map((c) => c.split(';')[0])
        .join('; ');
      const page = await fetch(`${base}${list.path}`, { headers: { cookie: cookies[list.path]! } });
      bodies[list.path] = await page.text();
      if (!page.ok) throw new Error(`${list.path}: ${page.status} ${bodies[list.path]}`);
    }
    children.push(await startChild([process.execPath, ...process.execArgv, self, 'serve-sql', bench.url, JSON.stringify(plans)], process.env, /ready/));
    children.push(await startChild([process.execPath, ...process.execArgv, self, 'serve-bytes', JSON.stringify(bodies)], process.env, /ready/));

    // PostgreSQL's processes: the parent of this connection's backend, and its children.
    const { rows: backendRows } = await bench.pool.query<{ pid: number }>('select pg_backend_pid() as pid');
    const postmaster = parentOf(backendRows[0]!.pid);
    await waitForQuiet('app started');
    // What the app and PostgreSQL spend with no request at all (the job queue's polling, say), a second.
    const idle = await cpuDuring({ server: children[0]!.pid!, pg: postmaster }, () => new Promise((r) => setTimeout(r, 5000)));
    console.log(`  idle, CPU a second: server ${(idle.cpuMs.server! / 5).toFixed(0)} ms, PostgreSQL ${(idle.cpuMs.pg! / 5).toFixed(0)} ms`);
    for (const [name, list] of Object.entries(lists)) {
      const cookie = { cookie: cookies[list.path]! };
      const sqlBody = await (await fetch(`http://127.0.0.1:${PORTS.sql}${list.path}`)).text();
      console.log(`\n  (${name}) GET ${list.path.replace(/from=[^&]+&to=[^&]+/, 'from=…&to=…')} as ${list.who}`);
      console.log(`    answer: app ${bodies[list.path]!.length} bytes, bare SQL server ${sqlBody.length} bytes`);
      // One request alone, step by step: the framework and middleware (health), + session, user and
      // ability (auth/me), + the list's queries and JSON.
      const health = await alone(`${base}/api/health`, {});
      const me = await alone(`${base}/api/auth/me`, cookie);
      const full = await alone(`${base}${list.path}`, cookie);
      const bare = await alone(`http://127.0.0.1:${PORTS.sql}${list.path}`, {});
      console.log(
        `    one request alone (median of 100): health ${health.toFixed(1)} ms · auth/me ${me.toFixed(1)} ms (session, user, ability +${(me - health).toFixed(1)}) · list ${full.toFixed(1)} ms (its queries and JSON +${(full - me).toFixed(1)}) · bare SQL server ${bare.toFixed(1)} ms`,
      );
      // CPU per request of the server's processes and of PostgreSQL's: holds when other work shares the machine.
      const measured = async (server: number, url: string, headers: Record<string, string> = {}) => {
        const { value, cpuMs } = await cpuDuring({ server, pg: postmaster }, () => drive(url, headers));
        const n = Math.max(1, value.requests.total);
        return { ...value, cpu: { server: cpuMs.server! / n, pg: cpuMs.pg! / n } };
      };
      const runs = {
        app: await measured(children[0]!.pid!, `${base}${list.path}`, cookie),
        sql: await measured(children[1]!.pid!, `http://127.0.0.1:${PORTS.sql}${list.path}`),
        bytes: await measured(children[2]!.pid!, `http://127.0.0.1:${PORTS.bytes}${list.path}`),
      };
      for (const [label, r] of Object.entries(runs)) {
        console.log(
          `    ${label.padEnd(6)} ${r.requests.average.toFixed(0).padStart(7)} req/s  p50 ${String(r.latency.p50).padStart(4)} ms  p99 ${String(r.latency.p99).padStart(4)} ms  ${r.non2xx} non-2xx, ${r.errors} errors  CPU a request: server ${r.cpu.server.toFixed(2)} ms, PostgreSQL ${r.cpu.pg.toFixed(2)} ms`,
        );
      }
      const app = runs.app.requests.average;
      const toSql = app / runs.sql.requests.average;
      const toBytes = app / runs.bytes.requests.average;
      const what = `API ${name} list at ${CONNECTIONS} connections`;
      reportTarget({ name: `${what}: requests/s ÷ bare node:http + pg`, figure: toSql * 100, unit: '%', target: 60, pass: atLeast(toSql * 100, 60) });
      reportTarget({
        name: `${what}: requests/s ÷ bare node:http from memory`,
        figure: toBytes * 100,
        unit: '%',
        target: 15,
        pass: atLeast(toBytes * 100, 15),
      });
      reportTarget({ name: `${what}: p99 latency`, figure: runs.app.latency.p99, unit: 'ms', target: 50, pass: atMost(runs.app.latency.p99, 50) });
    }
  } finally {
    for (const c of children) c.kill('SIGTERM');
    await queue.stop({ graceful: false, wait: true }).catch(() => undefined);
    await bench.drop();
  }
}

const [, , mode, ...args] = process.argv;
if (mode === 'serve-sql') serveSql(args[0]!, PORTS.sql, JSON.parse(args[1]!) as Record<string, Caught[]>);
else if (mode === 'serve-bytes') serveBytes(PORTS.bytes, JSON.parse(args[0]!) as Record<string, string>);
else await main();
