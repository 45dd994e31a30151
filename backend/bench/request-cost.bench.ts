// What one signed-in GET costs: `GET /api/auth/me` and a member's bookings list (50 a page) against one
// instance of the built server, as `npm start` runs it (production settings, logs at info). For each: the
// statements PostgreSQL ran and the rows it wrote per request (from pg_stat_database over sequential
// requests, with the queue's workers off), then requests/s, p50 and p99 at 50 connections. Prints figures; not a test (docs/request-cost.md).
// BENCH_SECONDS sets each run's length, BENCH_PORT_BASE the port (a free one otherwise), BENCH_CPU_PROF a
// folder for the instance's CPU profile (node --cpu-prof).
import path from 'node:path';
import autocannon from 'autocannon';
import { sql } from 'kysely';
import { pino, stdSerializers } from 'pino';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import { bookingListQuerySchema } from '../../shared/schemas/booking.ts';
import { findActiveUser } from '../modules/auth/auth.service.ts';
import { sessionStore } from '../modules/auth/session-store.ts';
import { listBookings } from '../modules/bookings/bookings.service.ts';
import { freePort, root, runSync } from '../scripts/lib.mjs';
import { productionEnv, signInCookie, startInstance, type Instance } from '../scripts/load-balancer.mjs';
import { benchDatabase } from './bench-db.ts';
import { waitForQuiet } from './process-cpu.ts';

const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const CONNECTIONS = 50;
const SEQUENTIAL = 200;
const STEP_ROUNDS = 500;
const routes = ['/api/auth/me', '/api/bookings?page=1&pageSize=50'];

/** Mean time of `fn` over STEP_ROUNDS calls one after another, in ms (after a few to warm up). */
async function stepMs(fn: () => unknown): Promise<number> {
  for (let i = 0; i < 20; i++) await fn();
  const t0 = performance.now();
  for (let i = 0; i < STEP_ROUNDS; i++) await fn();
  return (performance.now() - t0) / STEP_ROUNDS;
}

/** A browser's usual request headers, for the cost of a log line that carries them. */
const browserRequest = {
  id: 1,
  method: 'GET',
  url: '/api/bookings?page=1&pageSize=50',
  headers: {
    host: 'cellar.example.org',
    'user-agent': 'Mozilla/5.0 (X11; Linux x86_64) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/131.0.0.0 Safari/537.36',
    accept: 'application/json',
    'accept-language': 'en-GB,en;q=0.9',
    'accept-encoding': 'gzip, deflate, br, zstd',
    referer: 'https://cellar.example.org/bookings',
    'sec-fetch-site': 'same-origin',
    'sec-fetch-mode': 'cors',
    'sec-fetch-dest': 'empty',
    cookie: 'cw.sid=s%3Aabcdefghijklmnopqrstuvwxyz012345.abcdefghijklmnopqrstuvwxyz0123456789ABCDEFG',
  },
  socket: { remoteAddress: '127.0.0.1', remotePort: 50000 },
  raw: null,
};

/** Each step of a signed-in GET on its own, in this process, against the bench database. */
async function stepCosts(db: typeof bench.db, pool: typeof bench.pool, sid: string) {
  const member = await db.selectFrom('app_user').select(['id', 'roles']).where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
  const store = sessionStore({ pool, config: { NODE_ENV: 'test' } as Parameters<typeof sessionStore>[0]['config'] });
  const storeGet = () =>
    new Promise((resolve, reject) => store.get(sid, (err, s) => (err ? reject(new Error('session read failed', { cause: err })) : resolve(s))));
  const nowSeconds = () => Date.now() / 1000;
  const query = bookingListQuerySchema.parse({ page: '1', pageSize: '50' });
  const ability = defineAbilityFor({ id: member.id, roles: member.roles });
  const page = await listBookings(db, query, { id: member.id, ability });
  const devNull = pino.destination({ dest: '/dev/null', sync: true });
  const fullLog = pino({ redact: ['req.headers.cookie'], serializers: { req: stdSerializers.req, res: stdSerializers.res } }, devNull);
  const briefLog = pino({}, devNull);
  const res = { statusCode: 200, getHeaders: () => ({ 'content-type': 'application/json; charset=utf-8', 'content-length': '19000', etag: 'W/"4a38"' }) };
  const steps: [string, () => unknown][] = [
    [
      'session read (before: the session alone)',
      () => pool.query('select sess from session where sid = $1 and expire >= to_timestamp($2)', [sid, nowSeconds()]),
    ],
    ['user and roles read (before: a second statement)', () => findActiveUser(db, member.id)],
    ['session and person in one statement (now)', storeGet],
    [
      'session write-back (before: every request; now: once a minute)',
      () => pool.query('update session set expire = expire where sid = $1 returning sid', [sid]),
    ],
    ['ability built for a member', () => defineAbilityFor({ id: member.id, roles: member.roles })],
    ['request log line with headers (before, at info)', () => fullLog.info({ req: browserRequest, res, responseTime: 5 }, 'request completed')],
    [
      'request log line, method, address and status (now, at info)',
      () => briefLog.info({ req: { id: 1, method: 'GET', url: browserRequest.url }, res: { statusCode: 200 }, responseTime: 5 }, 'request completed'),
    ],
    ['query string validated (zod)', () => bookingListQuerySchema.parse({ page: '1', pageSize: '50' })],
    [
      'count of the list alone',
      () =>
        db
          .selectFrom('booking')
          .select(sql<number>`count(*)::int`.as('n'))
          .where('state', '<>', 'cancelled')
          .executeTakeFirst(),
    ],
    ['page of 50 and its count, side by side (listBookings)', () => listBookings(db, query, { id: member.id, ability })],
    [`page serialised (${(JSON.stringify(page).length / 1024).toFixed(0)} KiB of JSON)`, () => JSON.stringify(page)],
  ];
  console.log(`  each step alone, mean of ${STEP_ROUNDS} one after another:`);
  for (const [label, fn] of steps) console.log(`    ${label}: ${(await stepMs(fn)).toFixed(3)} ms`);
}

const bench = await benchDatabase('request_cost');
let instance: Instance | null = null;
try {
  runSync(process.execPath, [path.join(root, 'backend', 'scripts', 'build.mjs'), '--server']);
  const port = process.env.BENCH_PORT_BASE ? Number(process.env.BENCH_PORT_BASE) : await freePort();
  const profileDir = process.env.BENCH_CPU_PROF ? path.resolve(process.env.BENCH_CPU_PROF) : null;
  instance = startInstance({
    name: 'a',
    port,
    built: true,
    nodeArgs: profileDir ? ['--cpu-prof', '--cpu-prof-dir', profileDir] : [],
    // Only the requests measured reach the database (the statements are counted per request).
    env: { ...productionEnv(bench.url), WORKERS: 'false' },
  });
  await instance.ready();
  await waitForQuiet('instance started');
  const cookie = await signInCookie(instance.url, 'member@example.org');
  const sid = decodeURIComponent(/cw\.sid=([^;]+)/.exec(cookie)![1]!)
    .replace(/^s:/, '')
    .replace(/\.[^.]*$/, '');
  await stepCosts(bench.db, bench.pool, sid);

  const counters = async () => {
    // The statistics reach the views within a second of each transaction.
    await new Promise((r) => setTimeout(r, 1500));
    const { rows } = await sql<{ xact: number; sessionWrites: number; userReads: number }>`
      select (select xact_commit::int from pg_stat_database where datname = current_database()) as xact,
             (select (n_tup_upd + n_tup_ins)::int from pg_stat_user_tables where relname = 'session') as "sessionWrites",
             (select (coalesce(idx_scan, 0) + seq_scan)::int from pg_stat_user_tables where relname = 'app_user') as "userReads"`.execute(bench.db);
    return rows[0]!;
  };
  console.log(`  one instance (built server, production settings), a member's session; ${CONNECTIONS} connections for ${SECONDS} s:`);
  for (const route of routes) {
    const before = await counters();
    const t0 = performance.now();
    for (let i = 0; i < SEQUENTIAL; i++) {
      const r = await fetch(`${instance.url}${route}`, { headers: { cookie } });
      if (r.status !== 200) throw new Error(`${route}: ${r.status}`);
      await r.arrayBuffer();
    }
    const alone = (performance.now() - t0) / SEQUENTIAL;
    const after = await counters();
    // The counter query itself is one transaction of the two readings.
    const per = (n: number) => (n / SEQUENTIAL).toFixed(2);
    await autocannon({ url: `${instance.url}${route}`, connections: CONNECTIONS, duration: 2, headers: { cookie } }); // warm-up
    const r = await autocannon({ url: `${instance.url}${route}`, connections: CONNECTIONS, duration: SECONDS, headers: { cookie } });
    if (r.non2xx || r.errors) throw new Error(`${route}: ${r.non2xx} answers other than 2xx and ${r.errors} errors`);
    console.log(
      `  GET ${route}: alone ${alone.toFixed(2)} ms; per request ${per(after.xact - before.xact - 1)} statements, ${per(after.sessionWrites - before.sessionWrites)} session writes, ${per(after.userReads - before.userReads)} reads of app_user; ` +
        `${r.requests.average.toFixed(0)} req/s, p50 ${r.latency.p50} ms, p99 ${r.latency.p99} ms`,
    );
  }
} finally {
  await instance?.stop();
  await bench.drop();
}
