import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPaymentsFake, type PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { fillPath, fixtureMember, ownedKinds, routeRecords, type Owner, type RecordKind, type RouteRecord } from '../helpers/route-records.ts';
import { isWrite, routeKey, servedRoutes, type ServedRoute } from '../helpers/routes.ts';

/**
 * The permission matrix: every route the app serves under /api (read from the router itself) ×
 * anonymous and each role, on a record of the member's own and on another member's. A route
 * without an entry here fails, and so does an entry without a route.
 *
 * Cells: 'ok' = allowed (anything but 401/403 and never a 5xx: 2xx, or a 4xx about the empty body
 * or the record's state); 401 / 403 exactly; 404 where the product hides that the record exists.
 * Columns: [anonymous, member, others, brewer on duty, treasurer, admin], where `member` is a
 * member acting on their own record (or on a route without one) and `others` a member acting on
 * another member's record.
 */
type Cell = 'ok' | 401 | 403 | 404;
type Row = [anonymous: Cell, member: Cell, others: Cell, brewer: Cell, treasurer: Cell, admin: Cell];

interface Entry {
  cells: Row;
  /** What the route's path parameters point at. */
  record?: RecordKind;
  /** The body writes send (default `{}`); an array where `{}` would be a valid change of settings. */
  body?: unknown;
  /** Ends the session it is sent on: each signed-in role sends it on a session of its own. */
  endsSession?: true;
}

const ok = 'ok' as const;
const everyone: Row = [ok, ok, ok, ok, ok, ok];
const signedIn: Row = [401, ok, ok, ok, ok, ok];
const adminOnly: Row = [401, 403, 403, 403, 403, ok];
const books: Row = [401, 403, 403, 403, ok, ok]; // the treasurer and the admin
const cellarRota: Row = [401, 403, 403, ok, 403, ok]; // the brewer on duty and the admin
const cellarReaders: Row = [401, 403, 403, ok, ok, ok]; // the rota, the treasurer and the admin
const ownOrStaff: Row = [401, ok, 404, ok, ok, ok];
const ownInvoice: Row = [401, ok, 404, 403, ok, ok];
const kegHandling: Row = [401, 403, 404, ok, 403, ok];

const expected: Record<string, Entry> = {
  'GET /api/health': { cells: everyone },
  'GET /api/auth/csrf': { cells: everyone },
  'POST /api/auth/login': { cells: everyone },
  'POST /api/auth/logout': { cells: signedIn, endsSession: true },
  'GET /api/auth/me': { cells: signedIn },
  'PATCH /api/auth/me': { cells: signedIn },
  'POST /api/auth/password-reset': { cells: everyone },
  'POST /api/auth/password-reset/confirm': { cells: everyone },
  'GET /api/auth/invitations/:token': { cells: everyone, record: 'token' },
  'POST /api/auth/invitations/accept': { cells: everyone },
  'POST /api/auth/unlock': { cells: everyone },

  'GET /api/users': { cells: signedIn },
  'POST /api/users/invitations': { cells: adminOnly },
  // Another member's account is hidden from a member; the rota and the treasurer see it but change only their own.
  'PATCH /api/users/:id': { cells: [401, ok, 404, 403, 403, ok], record: 'user' },
  'GET /api/today': { cells: signedIn },
  'GET /api/audit': { cells: adminOnly },
  'GET /api/dev/mailbox': { cells: adminOnly },

  'GET /api/equipment': { cells: signedIn },
  'GET /api/equipment/labels.pdf': { cells: signedIn },
  'GET /api/equipment/next-code': { cells: adminOnly },
  'GET /api/equipment/:id': { cells: signedIn, record: 'equipment' },
  'POST /api/equipment': { cells: adminOnly },
  'PATCH /api/equipment/:id': { cells: adminOnly, record: 'equipment' },
  'POST /api/equipment/:id/state': { cells: cellarRota, record: 'equipment' },
  'GET /api/equipment/maintenance': { cells: signedIn },
  'POST /api/equipment/:id/inspections': { cells: cellarRota, record: 'equipment' },
  'POST /api/equipment/:id/connect': { cells: cellarRota, record: 'equipment' },
  'POST /api/equipment/:id/refill': { cells: cellarRota, record: 'equipment' },

  'GET /api/bookings/rules': { cells: signedIn },
  'GET /api/bookings': { cells: signedIn },
  // Everyone sees the calendar; another member's booking shows no holder, notes or batch (checked below).
  'GET /api/bookings/:id': { cells: signedIn, record: 'booking' },
  'POST /api/bookings': { cells: [401, ok, ok, 403, 403, ok] },
  'DELETE /api/bookings/:id': { cells: [401, ok, 403, 403, 403, ok], record: 'booking' },
  // A person's own calendar links; the rota's feed is for the brewer on duty (the treasurer has none).
  'GET /api/calendar-feeds': { cells: signedIn },
  'POST /api/calendar-feeds': { cells: [401, ok, ok, ok, 403, ok] },

  'GET /api/settings': { cells: [401, 403, 403, ok, ok, ok] },
  'GET /api/settings/:key': { cells: [401, 403, 403, ok, ok, ok], record: 'setting' },
  'PUT /api/settings/:key': { cells: adminOnly, record: 'setting', body: [] },

  'GET /api/batches': { cells: signedIn },
  'POST /api/batches': { cells: [401, ok, ok, 403, 403, ok] },
  'GET /api/batches/:id': { cells: ownOrStaff, record: 'batch' },
  'PATCH /api/batches/:id': { cells: [401, ok, 404, 403, 403, ok], record: 'batch' },
  'GET /api/batches/:id/readings': { cells: ownOrStaff, record: 'batch' },
  'POST /api/batches/:id/readings': { cells: [401, ok, 404, ok, 403, ok], record: 'batch' },
  'DELETE /api/batches/:id/readings/:readingId': { cells: [401, ok, 404, ok, 403, ok], record: 'reading' },
  'POST /api/batches/:id/readings/import': { cells: [401, ok, 404, ok, 403, ok], record: 'batch' },
  'GET /api/batches/:id/readings/import/progress/:progressId': { cells: ownOrStaff, record: 'importProgress' },
  'GET /api/batches/:id/trace': { cells: ownOrStaff, record: 'batch' },
  'GET /api/batches/:id/trace.csv': { cells: ownOrStaff, record: 'batch' },
  'GET /api/batches/:id/trace.pdf': { cells: ownOrStaff, record: 'batch' },
  // A member's report holds only their own batches.
  'GET /api/reports/trace': { cells: signedIn },
  'GET /api/readings/template.csv': { cells: [401, ok, ok, ok, 403, ok] },
  'GET /api/readings/template.xlsx': { cells: [401, ok, ok, ok, 403, ok] },
  'GET /api/production-records': { cells: signedIn },
  'GET /api/production-records/export': { cells: cellarReaders },

  'GET /api/invoice-runs': { cells: books },
  'GET /api/invoice-runs/preview': { cells: books },
  'POST /api/invoice-runs': { cells: books },
  'POST /api/invoice-runs/:id/send': { cells: books, record: 'invoiceRun' },
  'POST /api/invoice-runs/:id/issue': { cells: books, record: 'invoiceRun' },
  'GET /api/invoices': { cells: [401, ok, ok, 403, ok, ok] },
  'GET /api/invoices/export': { cells: books },
  'GET /api/invoices/:id': { cells: ownInvoice, record: 'invoice' },
  'GET /api/invoices/:id/pdf': { cells: ownInvoice, record: 'invoice' },
  'POST /api/invoices/:id/issue': { cells: books, record: 'invoice' },
  'POST /api/invoices/:id/send': { cells: books, record: 'invoice' },
  // Paying online is for the member the invoice is addressed to; the books record payments instead.
  'POST /api/invoices/:id/checkout': { cells: [401, ok, 404, 403, 403, 403], record: 'invoice' },
  'POST /api/invoices/:id/checkout/confirm': { cells: [401, ok, 404, 403, 403, 403], record: 'invoice' },
  'POST /api/invoices/:id/payments': { cells: books, record: 'invoice' },
  'POST /api/invoices/:id/void': { cells: books, record: 'invoice' },
  'POST /api/invoices/:id/refunds': { cells: books, record: 'invoice' },
  'GET /api/invoices/reminders': { cells: books },
  'POST /api/invoices/reminders': { cells: books },
  'POST /api/invoices/:id/reminders': { cells: books, record: 'invoice' },
  'GET /api/prices': { cells: books },
  'POST /api/prices': { cells: books },
  'DELETE /api/prices/:id': { cells: books, record: 'price' },
  'GET /api/tax-rates': { cells: books },
  'POST /api/tax-rates': { cells: books },
  'DELETE /api/tax-rates/:id': { cells: books, record: 'taxRate' },
  'GET /api/manual-charges': { cells: [401, ok, ok, 403, ok, ok] },
  'POST /api/manual-charges': { cells: books },
  'DELETE /api/manual-charges/:id': { cells: books, record: 'manualCharge' },
  'GET /api/billing/summary': { cells: books },
  'GET /api/billing/ageing': { cells: books },
  'GET /api/billing/overpayments': { cells: books },
  'POST /api/billing/overpayments/:id/refunded': { cells: books, record: 'overpayment' },
  'GET /api/billing/balance': { cells: [401, ok, ok, 403, ok, ok] },
  'GET /api/billing/profile': { cells: books },
  'PUT /api/billing/profile': { cells: books, body: [] },
  'GET /api/credit-notes/:id/pdf': { cells: ownInvoice, record: 'creditNote' },
  // No session and no CSRF token: the signature over the body is the check (400 without one).
  'POST /api/webhooks/payments': { cells: everyone },

  'POST /api/sanitation-cycles': { cells: cellarRota },
  'GET /api/sanitation-cycles': { cells: cellarReaders },
  'GET /api/sanitation-cycles/:id': { cells: cellarReaders, record: 'cycle' },
  'POST /api/sanitation-cycles/:id/steps': { cells: cellarRota, record: 'cycle' },
  'GET /api/sanitation-status': { cells: cellarReaders },
  'GET /api/reports/sanitation-audit.pdf': { cells: cellarReaders },
  'POST /api/transfers': { cells: cellarRota },
  'GET /api/transfers': { cells: cellarReaders },
  'GET /api/transfers/candidates': { cells: cellarRota },
  'GET /api/transfers/:id': { cells: cellarReaders, record: 'transfer' },
  'GET /api/kegs': { cells: signedIn },
  'GET /api/kegs/overdue': { cells: signedIn },
  'GET /api/kegs/tap-board': { cells: signedIn },
  'GET /api/kegs/:id': { cells: ownOrStaff, record: 'keg' },
  // The whole history names every member who had the keg: for those who may see holders.
  'GET /api/kegs/:id/history': { cells: [401, 403, 404, ok, ok, ok], record: 'keg' },
  'POST /api/kegs/:id/check-out': { cells: kegHandling, record: 'keg' },
  'POST /api/kegs/:id/return': { cells: kegHandling, record: 'keg' },
  'POST /api/kegs/:id/move': { cells: kegHandling, record: 'keg' },
  'POST /api/kegs/:id/empty': { cells: kegHandling, record: 'keg' },
  'POST /api/kegs/:id/undo': { cells: kegHandling, record: 'keg' },
  'PATCH /api/kegs/:id/level': { cells: kegHandling, record: 'keg' },
  'POST /api/kegs/:id/reminders': { cells: kegHandling, record: 'keg' },
  'POST /api/carbonation-plans/preview': { cells: signedIn },
  'POST /api/carbonation-plans': { cells: cellarRota },
  'GET /api/carbonation-plans': { cells: signedIn },
  'GET /api/carbonation-plans/:id': { cells: ownOrStaff, record: 'plan' },
  'POST /api/carbonation-plans/:id/pressure-lowered': { cells: kegHandling, record: 'plan' },
  'PATCH /api/carbonation-plans/:id': { cells: kegHandling, record: 'plan' },
};

type RoleKey = 'anonymous' | 'member' | 'member2' | 'brewer' | 'treasurer' | 'admin';
const roleEmails: Record<Exclude<RoleKey, 'anonymous'>, string> = {
  member: 'member@example.org',
  member2: 'member2@example.org',
  brewer: 'brewer@example.org',
  treasurer: 'treasurer@example.org',
  admin: 'admin@example.org',
};
const column: Record<Exclude<RoleKey, 'member' | 'member2'>, number> = { anonymous: 0, brewer: 3, treasurer: 4, admin: 5 };

let ctx: TestContext;
let fake: PaymentsFake;
let server: Server;
let clients: Record<Exclude<RoleKey, 'anonymous'>, ApiClient>;
let records: ReturnType<typeof routeRecords>;
let routes: ServedRoute[];
const owners = { member: fixtureMember('member'), member2: fixtureMember('member2') };

beforeAll(async () => {
  fake = await startPaymentsFake({ webhookRetries: 0 });
  ctx = await createTestContext({ PAYMENTS_FAKE_PORT: String(fake.port), LOGIN_LIMIT_PER_IP: '10000', LOGIN_LIMIT_PER_ACCOUNT: '10000' });
  server = ctx.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  ctx.config.publicUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const entries = await Promise.all(Object.entries(roleEmails).map(async ([k, email]) => [k, await ctx.signIn(email)] as const));
  clients = Object.fromEntries(entries) as typeof clients;
  records = routeRecords(ctx, clients.brewer);
  routes = servedRoutes(ctx.app);
});
afterAll(async () => {
  server?.close();
  await ctx?.close();
  await fake?.close();
});

function send(client: ApiClient | null, r: ServedRoute, url: string, body: unknown, withToken = true) {
  const m = r.method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
  const agent = client ? client.agent : request(ctx.app);
  let req = agent[m](url);
  if (!isWrite(r)) return req;
  if (client && withToken) req = req.set('X-CSRF-Token', client.csrf);
  return r.method === 'DELETE' ? req : req.send(body as object);
}

interface Call {
  role: RoleKey;
  /** Whose record the path points at (routes with an owned record). */
  owner?: Owner;
  expect: Cell;
  /** A member acting on a record that is not theirs. */
  foreign: boolean;
}

/** The calls a route gets, the refusals first, so an allowed change never alters what a refusal sees. */
function callsFor(entry: Entry): Call[] {
  const owned = entry.record !== undefined && ownedKinds.has(entry.record);
  const targets: (Owner | undefined)[] = owned ? [owners.member, owners.member2] : [undefined];
  const calls: Call[] = [];
  for (const owner of targets) {
    for (const role of ['anonymous', 'member', 'member2', 'brewer', 'treasurer', 'admin'] as RoleKey[]) {
      const isMember = role === 'member' || role === 'member2';
      const foreign = isMember && owner !== undefined && owner.key !== role;
      const cell = (isMember ? entry.cells[foreign ? 2 : 1] : entry.cells[column[role]]) as Cell;
      calls.push({ role, owner, expect: cell, foreign });
    }
  }
  return calls.sort((a, b) => Number(a.expect === ok) - Number(b.expect === ok));
}

const refused = (status: number) => status === 401 || status === 403;

describe('the route permission matrix', () => {
  it('has an entry for every route the app serves, and a route for every entry', () => {
    const served = new Set(routes.map(routeKey));
    const missing = [...served].filter((k) => !expected[k]).map((k) => `route ${k} has no entry`);
    const stale = Object.keys(expected)
      .filter((k) => !served.has(k))
      .map((k) => `entry ${k} has no route`);
    expect([...missing, ...stale]).toEqual([]);
    for (const r of routes) {
      const params = r.path.match(/:\w+/g) ?? [];
      expect(params.length > 0, `${routeKey(r)}: a route with parameters names its record`).toBe(expected[routeKey(r)]!.record !== undefined);
    }
    expect(routes.length).toBeGreaterThan(90);
  });

  it('answers anonymous and every role as the table says, on the member’s own and another member’s records', { timeout: 240_000 }, async () => {
    const failures: string[] = [];
    let calls = 0;
    for (const r of routes) {
      const entry = expected[routeKey(r)];
      if (!entry) continue;
      const made = new Map<string, RouteRecord>();
      const recordOf = async (owner: Owner | undefined) => {
        if (!entry.record) return undefined;
        const k = owner?.key ?? 'any';
        if (!made.has(k)) made.set(k, await records.make(entry.record, owner ?? owners.member));
        return made.get(k)!;
      };
      for (const call of callsFor(entry)) {
        const record = await recordOf(call.owner);
        const url = fillPath(r.path, record);
        let client: ApiClient | null = call.role === 'anonymous' ? null : clients[call.role];
        if (client && entry.endsSession) client = await ctx.signIn(roleEmails[call.role as keyof typeof roleEmails]);
        const res = await send(client, r, url, entry.body ?? {});
        calls++;
        const where = `${routeKey(r)} as ${call.role}${call.owner ? ` on ${call.owner.key}'s record` : ''}`;
        if (res.status >= 500) failures.push(`${where}: ${res.status} ${res.text.slice(0, 200)}`);
        else if (call.expect === ok ? refused(res.status) : res.status !== call.expect)
          failures.push(`${where}: expected ${call.expect}, got ${res.status} ${res.text.slice(0, 160)}`);
        if (res.status >= 400 && !/application\/problem\+json/.test(res.get('content-type') ?? ''))
          failures.push(`${where}: ${res.status} is not problem JSON`);
        // Nothing of the owner's reaches whoever the record is refused or hidden from, nor another member.
        if (record && (call.expect !== ok || call.foreign)) {
          const text = res.text ?? '';
          for (const m of record.marks) if (text.includes(m)) failures.push(`${where}: the answer (${res.status}) shows "${m}"`);
        }
      }
    }
    expect(failures).toEqual([]);
    expect(calls).toBeGreaterThan(750);
  });

  it('shows a member only their own records in every list they may read', { timeout: 120_000 }, async () => {
    // A full set of records for each of two members: batch, booking, keg, invoice, charge, plan.
    const made: Record<'member' | 'member2', string[]> = { member: [], member2: [] };
    for (const key of ['member', 'member2'] as const) {
      for (const kind of ['batch', 'booking', 'keg', 'invoice', 'manualCharge', 'plan'] as RecordKind[]) {
        made[key].push(...(await records.make(kind, owners[key])).marks);
      }
    }
    const failures: string[] = [];
    const lists = routes.filter((r) => r.method === 'GET' && !r.path.includes(':') && expected[routeKey(r)]?.cells[1] === ok);
    expect(lists.length).toBeGreaterThan(15);
    for (const r of lists) {
      for (const [me, them] of [
        ['member', 'member2'],
        ['member2', 'member'],
      ] as const) {
        const res = await clients[me].get(r.path);
        if (res.status >= 500 || refused(res.status)) failures.push(`${routeKey(r)} as ${me}: ${res.status}`);
        for (const m of new Set(made[them])) if ((res.text ?? '').includes(m)) failures.push(`${routeKey(r)} as ${me} shows ${them}'s "${m}"`);
      }
    }
    expect(failures).toEqual([]);
  });

  it('refuses every write without a valid CSRF token from a signed-in session (403), changing nothing', { timeout: 120_000 }, async () => {
    const writes = routes.filter((r) => isWrite(r) && !r.path.startsWith('/api/webhooks/'));
    expect(writes.length).toBeGreaterThan(40);
    const audited = async () =>
      (
        await ctx.db
          .selectFrom('audit_log')
          .select((eb) => eb.fn.countAll<string>().as('n'))
          .executeTakeFirstOrThrow()
      ).n;
    const failures: string[] = [];
    for (const r of writes) {
      const entry = expected[routeKey(r)]!;
      const record = entry.record ? await records.make(entry.record, owners.member) : undefined;
      const url = fillPath(r.path, record);
      const before = await audited();
      for (const token of [undefined, 'not-the-token']) {
        let req = clients.admin.agent[r.method.toLowerCase() as 'post'](url);
        if (token) req = req.set('X-CSRF-Token', token);
        const res = await (r.method === 'DELETE' ? req : req.send(entry.body ?? {}));
        if (res.status !== 403 || !/CSRF/.test(res.body?.title ?? ''))
          failures.push(`${routeKey(r)} ${token ? 'with a wrong token' : 'without a token'}: ${res.status}`);
      }
      if ((await audited()) !== before) failures.push(`${routeKey(r)}: a refused write left an audit row`);
    }
    expect(failures).toEqual([]);
    // The admin's session still works with its token.
    expect((await clients.admin.get('/api/auth/me')).status).toBe(200);
  });
});
