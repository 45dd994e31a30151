// Index use of the lists the screens show, on the benchmark data set. Each list is asked for through the
// app itself (createApp, signed in as the person whose screen it is), every SELECT its request runs is
// caught on the way to PostgreSQL and run again under EXPLAIN (ANALYZE, BUFFERS) with the same parameters.
// Prints per query: the plan's node types, whether an index is used, any sequential scan of a big table,
// buffers and execution time; then the cost of offset paging at deep pages. Figures only; not a test.
import { Kysely, PostgresDialect } from 'kysely';
import request from 'supertest';
import { createApp } from '../app.ts';
import { loadConfig } from '../config/env.ts';
import type { DB } from '../db/schema.ts';
import { systemClock } from '../lib/clock.ts';
import { createQueue } from '../lib/queue.ts';
import { benchDataset, datasetCounts } from './dataset.ts';
import { atMost, reportTarget } from './report.ts';

/** A table this big read from end to end by a list query is a missing index. */
const BIG_TABLE_ROWS = 10_000;

interface PlanNode {
  'Node Type': string;
  'Relation Name'?: string;
  'Index Name'?: string;
  'Shared Hit Blocks'?: number;
  'Shared Read Blocks'?: number;
  Plans?: PlanNode[];
}
interface Explained {
  nodes: string[];
  indexes: string[];
  seqScans: string[];
  buffers: number;
  ms: number;
}

const bench = await benchDataset('explain');
const caught: { sql: string; parameters: readonly unknown[] }[] = [];
const db = new Kysely<DB>({
  dialect: new PostgresDialect({ pool: bench.pool }),
  log: (e) => {
    if (e.level === 'query') caught.push({ sql: e.query.sql, parameters: e.query.parameters });
  },
});
const queue = await createQueue(bench.url);

try {
  const t = bench.template;
  console.log(
    t.built ? `  built the benchmark data set in ${(t.ms / 1000).toFixed(0)} s` : '  benchmark data set: the template was there already',
    `(cloned in ${(t.cloneMs / 1000).toFixed(1)} s)`,
  );
  console.log(`  ${JSON.stringify(await datasetCounts(bench.db))}`);
  const rows = new Map(
    (await bench.pool.query<{ relname: string; n: number }>(`select relname, reltuples::bigint as n from pg_class where relkind = 'r'`)).rows.map((r) => [
      r.relname,
      Number(r.n),
    ]),
  );

  const config = loadConfig({ NODE_ENV: 'test', DATABASE_URL: bench.url, PUBLIC_URL: 'http://127.0.0.1:3000' });
  const app = createApp({ config, db, pool: bench.pool, queue, clock: systemClock });
  const signIn = async (email: string) => {
    const agent = request.agent(app);
    const res = await agent.post('/api/auth/login').send({ email, password: 'cellar-demo' });
    if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status}`);
    return agent;
  };
  const as = { admin: await signIn('admin@example.org'), member: await signIn('member@example.org'), treasurer: await signIn('treasurer@example.org') };

  async function explain(q: { sql: string; parameters: readonly unknown[] }): Promise<Explained> {
    const res = await bench.pool.query<{ 'QUERY PLAN': [{ Plan: PlanNode; 'Execution Time': number }] }>(
      `explain (analyze, buffers, format json) ${q.sql}`,
      q.parameters as unknown[],
    );
    const plan = res.rows[0]!['QUERY PLAN'][0];
    const out: Explained = { nodes: [], indexes: [], seqScans: [], buffers: 0, ms: plan['Execution Time'] };
    const walk = (n: PlanNode) => {
      if (!out.nodes.includes(n['Node Type'])) out.nodes.push(n['Node Type']);
      if (n['Index Name'] && !out.indexes.includes(n['Index Name'])) out.indexes.push(n['Index Name']);
      if (n['Node Type'] === 'Seq Scan' && (rows.get(n['Relation Name'] ?? '') ?? 0) >= BIG_TABLE_ROWS) out.seqScans.push(n['Relation Name']!);
      (n.Plans ?? []).forEach(walk);
    };
    walk(plan.Plan);
    out.buffers = (plan.Plan['Shared Hit Blocks'] ?? 0) + (plan.Plan['Shared Read Blocks'] ?? 0);
    return out;
  }

  /** Asks for `url` as `who`, then explains every SELECT it ran but the sign-in's own (the user and roles). */
  async function listQueries(who: keyof typeof as, url: string) {
    caught.length = 0;
    const res = await as[who].get(url);
    if (res.status !== 200) throw new Error(`${url} as ${who}: ${res.status} ${JSON.stringify(res.body)}`);
    const selects = caught.filter((q) => /^\s*(select|with)/i.test(q.sql) && !/from "app_user" where "id" = \$1/.test(q.sql));
    return Promise.all(selects.map(async (q) => ({ sql: q.sql, ...(await explain(q)) })));
  }

  const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString();
  const batch = await bench.db.selectFrom('batch').select('id').where('name', '=', 'Bench batch 1000').executeTakeFirstOrThrow();
  const invoice = await bench.db.selectFrom('invoice').select('id').where('status', '=', 'paid').limit(1).executeTakeFirstOrThrow();
  const screens: [string, keyof typeof as, string][] = [
    ['bookings (calendar month)', 'member', `/api/bookings?page=1&pageSize=50&from=${day(-15)}&to=${day(15)}`],
    ['bookings (mine)', 'member', '/api/bookings?mine=1&page=1&pageSize=50'],
    ['bookings (all, newest)', 'admin', '/api/bookings?page=1&pageSize=50'],
    ['equipment', 'admin', '/api/equipment?page=1&pageSize=50'],
    ['equipment (kegs ready)', 'admin', '/api/equipment?kind=keg&state=ready'],
    ['inspections (maintenance)', 'admin', '/api/equipment/maintenance'],
    ['kegs', 'admin', '/api/kegs?page=1&pageSize=50'],
    ['transfers', 'admin', '/api/transfers?page=1&pageSize=50'],
    ['sanitation cycles', 'admin', '/api/sanitation-cycles?page=1&pageSize=50'],
    ['sanitation status', 'admin', '/api/sanitation-status'],
    ['readings of a batch', 'admin', `/api/batches/${batch.id}/readings?page=1&pageSize=100`],
    ['batches', 'admin', '/api/batches?page=1&pageSize=50'],
    ['invoices (treasurer)', 'treasurer', '/api/invoices?page=1&pageSize=50'],
    ['invoices (member)', 'member', '/api/invoices?page=1&pageSize=50'],
    ['invoice with payments', 'treasurer', `/api/invoices/${invoice.id}`],
    ['overpayments', 'treasurer', '/api/billing/overpayments?page=1&pageSize=50'],
    ['audit', 'admin', '/api/audit?page=1&pageSize=50'],
    ['audit (one subject type)', 'admin', '/api/audit?subjectType=Booking&page=1&pageSize=50'],
    ['users', 'admin', '/api/users?page=1&pageSize=50'],
    ['mailbox', 'admin', '/api/dev/mailbox'],
    ['carbonation', 'admin', '/api/carbonation-plans?page=1&pageSize=50'],
    ['today', 'admin', '/api/today'],
  ];

  let unindexed = 0;
  let worstMs = 0;
  for (const [name, who, url] of screens) {
    const queries = await listQueries(who, url);
    console.log(`\n  ${name}  (${who}: GET ${url.replace(/from=[^&]+&to=[^&]+/, 'from=…&to=…')})`);
    for (const q of queries) {
      const short = q.sql.replace(/\s+/g, ' ').slice(0, 110);
      const index = q.indexes.length ? `index: ${q.indexes.join(', ')}` : 'no index';
      const seq = q.seqScans.length ? `  SEQ SCAN of ${q.seqScans.join(', ')}` : '';
      console.log(`    ${q.ms.toFixed(2).padStart(8)} ms ${String(q.buffers).padStart(7)} buf  ${index}${seq}`);
      console.log(`      nodes: ${q.nodes.join(' › ')}`);
      console.log(`      ${short}${q.sql.length > 110 ? '…' : ''}`);
      if (q.seqScans.length || q.ms > 20) console.log(`      full SQL: ${q.sql.replace(/\s+/g, ' ')}`);
      if (q.seqScans.length) unindexed += 1;
      worstMs = Math.max(worstMs, q.ms);
    }
  }

  // Offset paging: the same list at page 1 and deep down. Each page of the list runs the page query
  // and the count beside it; the page query's time is the one that grows with the offset.
  console.log('\n  Offset paging at deep pages (the page query alone, execution ms)');
  const deep: [string, keyof typeof as, (page: number) => string, number][] = [
    ['bookings, all', 'admin', (p) => `/api/bookings?page=${p}&pageSize=100`, 500],
    ['audit', 'admin', (p) => `/api/audit?page=${p}&pageSize=100`, 500],
    ['readings of a batch', 'admin', (p) => `/api/batches/${batch.id}/readings?page=${p}&pageSize=100`, 5],
    ['invoices', 'treasurer', (p) => `/api/invoices?page=${p}&pageSize=100`, 50],
    ['sanitation cycles', 'admin', (p) => `/api/sanitation-cycles?page=${p}&pageSize=100`, 150],
  ];
  for (const [name, who, url, last] of deep) {
    const pageMs = async (p: number) => {
      const qs = (await listQueries(who, url(p))).filter((q) => /offset/i.test(q.sql));
      return qs.reduce((s, q) => s + q.ms, 0);
    };
    const first = await pageMs(1);
    const far = await pageMs(last);
    console.log(
      `    ${name.padEnd(22)} page 1: ${first.toFixed(2).padStart(7)} ms   page ${String(last).padEnd(4)}: ${far.toFixed(2).padStart(7)} ms   ×${(far / Math.max(first, 0.01)).toFixed(1)}${far > 3 * first && far > 10 ? '  (degrades with depth: keyset paging would keep it flat)' : ''}`,
    );
  }

  reportTarget({
    name: 'List queries of the screens with a sequential scan of a big table (≥ 10,000 rows)',
    figure: unindexed,
    unit: 'queries',
    target: 0,
    pass: atMost(unindexed, 0),
  });
  reportTarget({ name: 'Slowest list query on the benchmark data set (EXPLAIN ANALYZE)', figure: worstMs, unit: 'ms', target: 50, pass: atMost(worstMs, 50) });
} finally {
  await queue.stop({ graceful: false, wait: true }).catch(() => undefined);
  await bench.drop();
}
