import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import fc from 'fast-check';
import { sql } from 'kysely';
import Stripe from 'stripe';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPaymentsFake, type PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import { defaultBillingProfile } from '../../shared/schemas/billing.ts';
import { settingKeys, settingSections } from '../../shared/schemas/settings.ts';
import { createKeg, cycleSteps, DAY, HOUR } from '../../db/factories/index.ts';
import { batchPool, fullChecklist, makeReady } from '../helpers/cellar.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { bodies, nulInJson } from '../helpers/fuzz-bodies.ts';
import { fillPath, fixtureMember, routeRecords, type RecordKind, type RouteRecord } from '../helpers/route-records.ts';
import { isWrite, routeKey, servedRoutes, type ServedRoute } from '../helpers/routes.ts';

/**
 * The write fuzzer: every write route the app serves (read from the router, as the permission
 * matrix reads it) gets generated JSON as the role allowed to write it, with a real record in its
 * path: arbitrary JSON values and objects, and a valid body with one field replaced by a wrong
 * type, a huge or odd string, a negative or huge number, deep nesting, or an array. Whatever comes,
 * the app never answers 5xx, every 4xx is problem JSON, and a refused request changes no row of
 * any table.
 * Strings include NUL and other control characters, which the app refuses at its edge (422).
 */

/** Runs per route (a route that ends the session it is sent on gets fewer: each run signs in anew). */
const RUNS = Number(process.env.FUZZ_RUNS ?? 30);
/** Fixed by default so a failure reproduces; set FUZZ_SEED to explore other inputs. */
const SEED = Number(process.env.FUZZ_SEED ?? 20261204);

type Writer = 'anonymous' | 'member' | 'brewer' | 'treasurer' | 'admin' | 'webhook';
interface Fixtures {
  now: Date;
  record?: RouteRecord;
  fermenterId: string;
  memberId: string;
  transfer: { batchId: string; fermenterId: string; kegIds: string[] };
  plannableKegId: string;
  cycleSteps: unknown[];
}
interface FuzzEntry {
  as: Writer;
  record?: RecordKind;
  valid: (f: Fixtures) => Record<string, unknown>;
  endsSession?: true;
  /** Fuzz each of several paths (every settings section), with that path's valid body. */
  each?: () => { key: string; valid: Record<string, unknown> }[];
}

const iso = (d: Date) => d.toISOString();
const day = (d: Date, days: number) => new Date(d.getTime() + days * DAY).toISOString().slice(0, 10);

const entries: Record<string, FuzzEntry> = {
  'POST /api/auth/login': { as: 'anonymous', valid: () => ({ email: 'member3@example.org', password: 'cellar-demo' }) },
  'POST /api/auth/logout': { as: 'member', valid: () => ({}), endsSession: true },
  'PATCH /api/auth/me': { as: 'member', valid: () => ({ name: 'Maren Holloway', units: 'metric' }) },
  'POST /api/auth/password-reset': { as: 'anonymous', valid: () => ({ email: 'member6@example.org' }) },
  'POST /api/auth/password-reset/confirm': { as: 'anonymous', valid: () => ({ token: 'not-a-real-token', password: 'a-long-new-password' }) },
  'POST /api/auth/unlock': { as: 'anonymous', valid: () => ({ token: 'not-a-real-token' }) },
  'POST /api/auth/invitations/accept': { as: 'anonymous', valid: () => ({ token: 'not-a-real-token', name: 'New Person', password: 'a-long-new-password' }) },
  'POST /api/users/invitations': { as: 'admin', valid: () => ({ email: 'fuzz.invitee@example.org', name: 'Fuzz Invitee', roles: ['member'] }) },
  'PATCH /api/users/:id': { as: 'admin', record: 'user', valid: () => ({ name: 'Maren Holloway' }) },
  'POST /api/equipment': {
    as: 'admin',
    valid: () => ({ code: 'K-901', kind: 'keg', name: '19 L ball lock keg 901', capacityLiters: 19, attributes: { serial: 'LY19-B09011', lock: 'ball' } }),
  },
  'PATCH /api/equipment/:id': {
    as: 'admin',
    record: 'equipment',
    valid: () => ({ name: 'Renamed fermenter', notes: 'Lid replaced', attributes: { style: 'bucket', hasValve: true } }),
  },
  'POST /api/equipment/:id/state': { as: 'brewer', record: 'equipment', valid: () => ({ state: 'cleaned', reason: 'Soaked and rinsed' }) },
  'POST /api/equipment/:id/inspections': {
    as: 'brewer',
    record: 'equipment',
    valid: (f) => ({ kind: 'pressure_test', at: iso(new Date(f.now.getTime() - HOUR)), passed: true, note: 'Fuzz' }),
  },
  'POST /api/equipment/:id/connect': { as: 'brewer', record: 'equipment', valid: () => ({ note: 'Fuzz' }) },
  'POST /api/equipment/:id/refill': { as: 'brewer', record: 'equipment', valid: () => ({ remainingKg: 5, note: 'Fuzz' }) },
  'POST /api/bookings': {
    as: 'member',
    valid: (f) => ({
      equipmentId: f.fermenterId,
      startsAt: iso(new Date(f.now.getTime() + 20 * DAY)),
      endsAt: iso(new Date(f.now.getTime() + 24 * DAY)),
      notes: 'Fuzz',
    }),
  },
  'DELETE /api/bookings/:id': { as: 'member', record: 'booking', valid: () => ({}) },
  'POST /api/calendar-feeds': { as: 'member', valid: () => ({ kind: 'member' }) },
  'PUT /api/settings/:key': {
    as: 'admin',
    record: 'setting',
    valid: () => ({ ...(settingSections.booking_rules.defaults as Record<string, unknown>), maxActiveBookingsPerMember: 24 }),
    each: () =>
      settingKeys.map((key) => ({
        key,
        valid: { ...(settingSections[key].defaults as Record<string, unknown>), ...(key === 'booking_rules' ? { maxActiveBookingsPerMember: 24 } : {}) },
      })),
  },
  'POST /api/batches': {
    as: 'member',
    valid: () => ({ name: 'Fuzz amber', style: 'Amber ale', volumeLiters: 23, targetOg: 1.052, targetFg: 1.012, notes: 'Fuzz' }),
  },
  'PATCH /api/batches/:id': {
    as: 'member',
    record: 'batch',
    valid: () => ({ name: 'Renamed amber', style: 'Amber ale', volumeLiters: 21, notes: 'Topped up' }),
  },
  'POST /api/batches/:id/readings': {
    as: 'member',
    record: 'batch',
    valid: (f) => ({ takenAt: iso(new Date(f.now.getTime() - HOUR)), gravity: 1.02, unit: 'sg', temperatureC: 20, note: 'Fuzz' }),
  },
  'DELETE /api/batches/:id/readings/:readingId': { as: 'member', record: 'reading', valid: () => ({}) },
  'POST /api/batches/:id/readings/import': { as: 'member', record: 'batch', valid: () => ({ mapping: { takenAt: 'Taken at', gravity: 'Gravity' } }) },
  'POST /api/invoice-runs': { as: 'treasurer', valid: () => ({ period: '2026-11', issue: false }) },
  'POST /api/invoice-runs/:id/send': { as: 'treasurer', record: 'invoiceRun', valid: () => ({}) },
  'POST /api/invoice-runs/:id/issue': { as: 'treasurer', record: 'invoiceRun', valid: () => ({}) },
  'POST /api/invoices/:id/issue': { as: 'treasurer', record: 'invoice', valid: () => ({}) },
  'POST /api/invoices/:id/send': { as: 'treasurer', record: 'invoice', valid: () => ({}) },
  'POST /api/invoices/:id/reminders': { as: 'treasurer', record: 'invoice', valid: () => ({}) },
  'POST /api/invoices/reminders': { as: 'treasurer', valid: () => ({}) },
  'POST /api/invoices/:id/checkout': { as: 'member', record: 'invoice', valid: () => ({}) },
  'POST /api/invoices/:id/checkout/confirm': { as: 'member', record: 'invoice', valid: () => ({ sessionId: 'cs_test_not_a_session' }) },
  'POST /api/invoices/:id/payments': {
    as: 'treasurer',
    record: 'invoice',
    valid: (f) => ({ amountCents: 100, method: 'bank_transfer', receivedOn: day(f.now, 0), reference: 'Transfer 1', note: 'Fuzz' }),
  },
  'POST /api/billing/overpayments/:id/refunded': {
    as: 'treasurer',
    record: 'overpayment',
    valid: (f) => ({ refundedOn: day(f.now, 0), reference: 'Refund 1' }),
  },
  'POST /api/invoices/:id/void': { as: 'treasurer', record: 'invoice', valid: () => ({ reason: 'Billed by mistake', refundMethod: null }) },
  'POST /api/invoices/:id/refunds': {
    as: 'treasurer',
    record: 'invoice',
    valid: () => ({ amountCents: 100, reason: 'Goodwill', refundMethod: 'bank_transfer' }),
  },
  'POST /api/prices': { as: 'treasurer', valid: (f) => ({ item: 'keg_week', unitCents: 250, effectiveFrom: day(f.now, 400), note: 'Fuzz' }) },
  'DELETE /api/prices/:id': { as: 'treasurer', record: 'price', valid: () => ({}) },
  'POST /api/tax-rates': { as: 'treasurer', valid: (f) => ({ rateBp: 900, label: 'VAT', effectiveFrom: day(f.now, 500) }) },
  'DELETE /api/tax-rates/:id': { as: 'treasurer', record: 'taxRate', valid: () => ({}) },
  'POST /api/manual-charges': {
    as: 'treasurer',
    valid: (f) => ({ memberId: f.memberId, period: '2026-11', description: 'Part supplied', reason: 'Fuzz', amountCents: 500, taxable: true }),
  },
  'DELETE /api/manual-charges/:id': { as: 'treasurer', record: 'manualCharge', valid: () => ({}) },
  'PUT /api/billing/profile': { as: 'treasurer', valid: () => ({ ...defaultBillingProfile }) },
  'POST /api/webhooks/payments': {
    as: 'webhook',
    valid: () => ({
      id: 'evt_fuzz',
      object: 'event',
      type: 'checkout.session.completed',
      data: {
        object: {
          id: 'cs_fuzz',
          object: 'checkout.session',
          payment_status: 'paid',
          amount_total: 100,
          currency: 'eur',
          metadata: { invoiceId: '00000000-0000-4000-8000-000000000000' },
        },
      },
    }),
  },
  'POST /api/sanitation-cycles': { as: 'brewer', valid: (f) => ({ equipmentId: f.fermenterId, steps: f.cycleSteps, notes: 'Fuzz' }) },
  'POST /api/sanitation-cycles/:id/steps': { as: 'brewer', record: 'cycle', valid: (f) => ({ steps: f.cycleSteps.slice(2), notes: 'Fuzz' }) },
  'POST /api/transfers': {
    as: 'brewer',
    valid: (f) => ({
      batchId: f.transfer.batchId,
      fromEquipmentId: f.transfer.fermenterId,
      toKegIds: f.transfer.kegIds,
      volumeLiters: 38,
      checklist: fullChecklist,
      finings: { kind: 'gelatin', amount: 2, unit: 'g' },
      notes: 'Fuzz',
      startedAt: iso(new Date(f.now.getTime() - 20 * 60_000)),
      endedAt: iso(new Date(f.now.getTime() - 2 * 60_000)),
      dissolvedOxygenPpb: 55,
      kegDissolvedOxygenPpb: f.transfer.kegIds.map(() => null),
    }),
  },
  'POST /api/kegs/:id/check-out': {
    as: 'brewer',
    record: 'keg',
    valid: (f) => ({ memberId: f.memberId, dueAt: iso(new Date(f.now.getTime() + 14 * DAY)), note: 'Fuzz' }),
  },
  'POST /api/kegs/:id/return': { as: 'brewer', record: 'keg', valid: () => ({ note: 'Back' }) },
  'POST /api/kegs/:id/move': { as: 'brewer', record: 'keg', valid: () => ({ to: 'cold_room', tapId: null, note: 'Fuzz' }) },
  'POST /api/kegs/:id/empty': { as: 'brewer', record: 'keg', valid: () => ({ note: 'Kicked' }) },
  'POST /api/kegs/:id/undo': { as: 'brewer', record: 'keg', valid: () => ({ actionId: '00000000-0000-4000-8000-000000000000' }) },
  'PATCH /api/kegs/:id/level': { as: 'brewer', record: 'keg', valid: () => ({ remainingLiters: 12.5 }) },
  'POST /api/kegs/:id/reminders': { as: 'brewer', record: 'keg', valid: () => ({}) },
  'POST /api/carbonation-plans/preview': {
    as: 'brewer',
    valid: () => ({ targetVolumes: 2.5, temperatureC: 3, altitudeM: 0, method: 'fast_start', line: { lengthM: 3, insideDiameterMm: 4.8, riseM: 0.6 } }),
  },
  'POST /api/carbonation-plans': {
    as: 'brewer',
    valid: (f) => ({ kegId: f.plannableKegId, targetVolumes: 2.4, method: 'set_and_hold', styleFamily: 'Ales', notes: 'Fuzz' }),
  },
  'POST /api/carbonation-plans/:id/pressure-lowered': { as: 'brewer', record: 'plan', valid: () => ({}) },
  'PATCH /api/carbonation-plans/:id': { as: 'brewer', record: 'plan', valid: () => ({ state: 'done' }) },
};

// ---- The run ----

let ctx: TestContext;
let fake: PaymentsFake;
let server: Server;
let clients: Record<Exclude<Writer, 'anonymous' | 'webhook'>, ApiClient>;
let records: ReturnType<typeof routeRecords>;
let routes: ServedRoute[];
let tables: string[];

const emails = { member: 'member@example.org', brewer: 'brewer@example.org', treasurer: 'treasurer@example.org', admin: 'admin@example.org' } as const;

// Rows written beside any request, not by it: sessions and sign-in counters, the SMTP fake's
// mailbox (queued mail lands whenever the worker sends it), import progress (pruned in the background).
const notCounted = new Set(['session', 'rate_limit', 'dev_mail_message', 'reading_import_progress']);

async function rowCounts(): Promise<Record<string, number>> {
  const cols = tables.map((t) => sql`(select count(*)::int from ${sql.table(t)}) as ${sql.ref(t)}`);
  const r = await sql<Record<string, number>>`select ${sql.join(cols)}`.execute(ctx.db);
  return r.rows[0]!;
}

beforeAll(async () => {
  fake = await startPaymentsFake({ webhookRetries: 0 });
  ctx = await createTestContext({ PAYMENTS_FAKE_PORT: String(fake.port), LOGIN_LIMIT_PER_IP: '100000', LOGIN_LIMIT_PER_ACCOUNT: '100000' });
  server = ctx.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  ctx.config.publicUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const signed = await Promise.all(Object.entries(emails).map(async ([k, e]) => [k, await ctx.signIn(e)] as const));
  clients = Object.fromEntries(signed) as typeof clients;
  records = routeRecords(ctx, clients.brewer);
  routes = servedRoutes(ctx.app).filter(isWrite);
  const t = await sql<{ tablename: string }>`select tablename from pg_tables where schemaname = 'public' order by tablename`.execute(ctx.db);
  tables = t.rows.map((r) => r.tablename).filter((n) => !notCounted.has(n) && !n.startsWith('kysely_'));
});
afterAll(async () => {
  server?.close();
  await ctx?.close();
  await fake?.close();
});

function send(r: ServedRoute, as: Writer, client: ApiClient | null, url: string, body: unknown) {
  const m = r.method.toLowerCase() as 'post' | 'put' | 'patch' | 'delete';
  if (as === 'webhook') {
    const payload = JSON.stringify(body);
    const header = Stripe.webhooks.generateTestHeaderString({ payload, secret: ctx.config.STRIPE_WEBHOOK_SECRET });
    return request(ctx.app).post(url).set('Content-Type', 'application/json').set('Stripe-Signature', header).send(payload);
  }
  let req = client ? client.agent[m](url).set('X-CSRF-Token', client.csrf) : request(ctx.app)[m](url);
  req = req.set('Content-Type', 'application/json');
  return req.send(JSON.stringify(body));
}

describe('the write fuzzer', () => {
  it('has a writer and a valid body for every write route the app serves', () => {
    const served = routes.map(routeKey);
    expect(served.filter((k) => !entries[k]).map((k) => `route ${k} has no fuzz entry`)).toEqual([]);
    expect(
      Object.keys(entries)
        .filter((k) => !served.includes(k))
        .map((k) => `entry ${k} has no route`),
    ).toEqual([]);
  });

  it('never answers 5xx, answers every 4xx with problem JSON, and a refused write changes no row', { timeout: 400_000 }, async () => {
    const now = ctx.clock.now();
    const takeBatch = batchPool(ctx);
    const batch = await takeBatch({ ownerId: fixtureMember('member').id });
    const kegs = [await createKeg(ctx.db), await createKeg(ctx.db)];
    await makeReady(
      clients.brewer,
      kegs.map((k) => k.id),
      ctx.clock,
    );
    const plannable = await records.filledKeg(fixtureMember('member'));
    const fermenter = await records.make('equipment', fixtureMember('member'));
    const base: Omit<Fixtures, 'record'> = {
      now,
      fermenterId: fermenter.params.id!,
      memberId: fixtureMember('member').id,
      transfer: { batchId: batch.batchId, fermenterId: batch.fermenterId, kegIds: kegs.map((k) => k.id) },
      plannableKegId: plannable.kegId,
      cycleSteps: cycleSteps(new Date(now.getTime() - HOUR)),
    };

    const failures: string[] = [];
    let sent = 0;
    let withNul = 0;
    const statuses: Record<string, number> = {};
    /** One generated body to one route; a request that throws is a failure too, never a stop. */
    async function probe(r: ServedRoute, entry: FuzzEntry, url: string, body: unknown) {
      const where = `${r.method} ${url} with ${JSON.stringify(body).slice(0, 300)}`;
      try {
        let client: ApiClient | null = null;
        if (entry.as !== 'anonymous' && entry.as !== 'webhook') client = entry.endsSession ? await ctx.signIn(emails[entry.as]) : clients[entry.as];
        const before = await rowCounts();
        const res = await send(r, entry.as, client, url, body);
        sent++;
        if (nulInJson().test(JSON.stringify(body))) withNul++;
        statuses[res.status] = (statuses[res.status] ?? 0) + 1;
        if (res.status >= 500) failures.push(`${where}: ${res.status} ${res.text.slice(0, 300)}`);
        if (res.status >= 400 && !/^application\/problem\+json/.test(res.get('content-type') ?? ''))
          failures.push(`${where}: ${res.status} as ${res.get('content-type')}`);
        if (res.status >= 400) {
          const after = await rowCounts();
          const changed = tables.filter((t) => before[t] !== after[t]).map((t) => `${t} ${before[t]}→${after[t]}`);
          if (changed.length) failures.push(`${where}: refused with ${res.status} yet changed ${changed.join(', ')}`);
        }
      } catch (err) {
        failures.push(`${where}: the request failed: ${(err as Error).stack?.slice(0, 600)}`);
      }
    }

    // Settings the fuzzer managed to save (a valid-looking chemical list, say) would change the rules the
    // records of later routes are made under: each route starts from the fixture's settings.
    const fixtureSettings = await ctx.db.selectFrom('setting').selectAll().execute();
    const restoreSettings = async () => {
      await ctx.db.deleteFrom('setting').execute();
      if (fixtureSettings.length)
        await ctx.db
          .insertInto('setting')
          .values(fixtureSettings.map((row) => ({ ...row, value: JSON.stringify(row.value) })))
          .execute();
    };
    for (const [i, r] of routes.entries()) {
      const entry = entries[routeKey(r)]!;
      await restoreSettings();
      const record = entry.record ? await records.make(entry.record, fixtureMember(entry.record === 'user' ? 'member2' : 'member')) : undefined;
      const targets = entry.each
        ? entry.each().map((t) => ({ url: fillPath(r.path, { params: { key: t.key }, marks: [] }), valid: t.valid }))
        : [{ url: fillPath(r.path, record), valid: entry.valid({ ...base, record }) }];
      const numRuns = entry.endsSession ? Math.min(RUNS, 5) : entry.each ? Math.ceil(RUNS / 2) : RUNS;
      for (const [j, { url, valid }] of targets.entries()) {
        await fc.assert(
          fc.asyncProperty(bodies(valid), (body) => probe(r, entry, url, body)),
          // Each route (and path) its own stream of inputs, reproducible from SEED.
          { numRuns, seed: SEED + i * 100 + j, endOnFailure: true },
        );
      }
    }
    // The refused writes said what was wrong; some generated bodies were also fine to take.
    console.info(`write fuzzer: ${sent} requests over ${routes.length} routes (${withNul} with NUL), seed ${SEED}; statuses ${JSON.stringify(statuses)}`);
    expect(failures).toEqual([]);
    expect(sent).toBeGreaterThan(routes.length * 10);
  });
});
