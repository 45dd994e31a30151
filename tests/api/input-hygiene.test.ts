import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import { describe, expect, it } from 'vitest';
import { createBatch, createFermenter, createKeg, createMember } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { rowCounts } from '../helpers/counts.ts';
import { servedRoutes } from '../helpers/routes.ts';

let ctx: TestContext;
let admin: ApiClient, member: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  admin = await ctx.signIn('admin@example.org');
  member = await ctx.signIn('member@example.org');
});

interface RouteInfo {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
}

/** Every route the app serves, read from its routers, so a route added later is checked here without being listed. */
function appRoutes(app: Express): RouteInfo[] {
  const methods: string[] = ['get', 'post', 'put', 'patch', 'delete'] satisfies RouteInfo['method'][];
  return servedRoutes(app)
    .map((r) => ({ method: r.method.toLowerCase() as RouteInfo['method'], path: r.path }))
    .filter((r) => r.path.startsWith('/api/') && methods.includes(r.method));
}

const paramNames = (path: string) => [...path.matchAll(/:(\w+)/g)].map((m) => m[1]!);
const isIdParam = (name: string) => name === 'id' || /Id$/.test(name);
const fill = (path: string, values: Record<string, string>) => path.replace(/:(\w+)/g, (_, n: string) => values[n]!);

function call(client: ApiClient, { method, path }: RouteInfo, body: object = {}) {
  if (method === 'get') return client.get(path);
  if (method === 'delete') return client.delete(path);
  if (method === 'post') return client.post(path, body);
  return client[method](path, body);
}

function expectProblem(res: { status: number; headers: Record<string, string>; body: { status?: number } }, status: number) {
  expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  expect(res.status).toBe(status);
  expect(res.body.status).toBe(status);
}

/** Ids that are not UUIDs, as a client might send them by mistake or on purpose. */
const malformedIds = [
  'not-a-uuid',
  '12345',
  "1' or '1'='1",
  '0000000-0000-4000-8000-000000000000',
  // 36 characters of hex digits and hyphens, but not a UUID's groups: what a loose length-and-alphabet check lets through.
  '-'.repeat(36),
  'f'.repeat(36),
  '0000000-00000-4000-8000-000000000000',
  `${randomUUID()}0`,
  'zzzzzzzz-zzzz-zzzz-zzzz-zzzzzzzzzzzz',
  encodeURIComponent('€'),
  'x'.repeat(400),
];

/** A body most write routes would take, so a route that reads its body first still reaches its id. */
const plausibleBody = { name: 'x', notes: 'x', state: 'ready', reason: 'x', amountCents: 100, method: 'cash', receivedOn: '2026-11-30', sessionId: 'x' };

describe('ids in the address', () => {
  it('every route with an id parameter answers 404 problem JSON for an id that is not a UUID, for every caller', async () => {
    const routes = appRoutes(ctx.app).filter((r) => paramNames(r.path).some(isIdParam));
    // The registry of routes is read from the app: this catches any route added later.
    expect(routes.length).toBeGreaterThanOrEqual(40);
    const failures: string[] = [];
    let calls = 0;
    for (const route of routes) {
      const names = paramNames(route.path);
      for (const bad of malformedIds) {
        // Every id malformed, then each one alone malformed with the others well-formed (but naming nothing).
        const variants = [Object.fromEntries(names.map((n) => [n, bad]))];
        if (names.filter(isIdParam).length > 1) {
          for (const n of names.filter(isIdParam)) variants.push(Object.fromEntries(names.map((o) => [o, o === n ? bad : randomUUID()])));
        }
        for (const values of variants) {
          // Every caller gets the same answer: the admin tries every malformed id, a member a few.
          for (const client of bad === malformedIds[0] || bad === malformedIds[4] ? [admin, member] : [admin]) {
            const res = await call(client, { ...route, path: fill(route.path, values) }, plausibleBody);
            calls++;
            if (res.status !== 404 || !/problem\+json/.test(res.headers['content-type'] ?? '')) {
              failures.push(`${route.method.toUpperCase()} ${fill(route.path, values)} as ${client.user.email}: ${res.status}`);
            }
          }
        }
      }
    }
    expect(failures).toEqual([]);
    expect(calls).toBeGreaterThan(500);
  }, 180_000);

  it('a well-formed id that names nothing is the same 404, and a real id still works', async () => {
    const batch = await createBatch(ctx.db, { ownerId: fixtureUserId('member') });
    expectProblem(await member.get(`/api/batches/${randomUUID()}`), 404);
    expect((await member.get(`/api/batches/${batch.id}`)).status).toBe(200);
    expect((await member.get(`/api/batches/${batch.id.toUpperCase()}`)).status).toBe(200);
    const res = await member.get('/api/batches/not-a-uuid');
    expectProblem(res, 404);
    expect(res.body).toMatchObject({ title: 'Not found', detail: 'Batch not found.' });
  });

  it('other parameters (a setting’s key, an invitation token) answer 4xx for junk, never 500', async () => {
    const routes = appRoutes(ctx.app).filter((r) => paramNames(r.path).length && !paramNames(r.path).some(isIdParam));
    expect(routes.length).toBeGreaterThan(0);
    for (const route of routes) {
      for (const bad of malformedIds) {
        const res = await call(admin, { ...route, path: fill(route.path, Object.fromEntries(paramNames(route.path).map((n) => [n, bad]))) });
        expect(res.status, `${route.method} ${route.path} with ${bad}`).toBeGreaterThanOrEqual(400);
        expect(res.status, `${route.method} ${route.path} with ${bad}`).toBeLessThan(500);
      }
    }
  });

  it('ids in query strings and bodies are checked before any query', async () => {
    const treasurer = await ctx.signIn('treasurer@example.org');
    const brewer = await ctx.signIn('brewer@example.org');
    const checks: [ApiClient, RouteInfo, object?][] = [
      [admin, { method: 'get', path: '/api/bookings?equipmentId=nope' }],
      [treasurer, { method: 'get', path: '/api/invoices?memberId=nope' }],
      [treasurer, { method: 'get', path: '/api/billing/balance?memberId=nope' }],
      [treasurer, { method: 'get', path: '/api/manual-charges?memberId=nope' }],
      [admin, { method: 'get', path: '/api/batches?ownerId=nope' }],
      [admin, { method: 'get', path: '/api/equipment/labels.pdf?ids=nope' }],
      [admin, { method: 'get', path: '/api/audit?actorId=nope' }],
      [brewer, { method: 'get', path: '/api/reports/sanitation-audit.pdf?from=2026-11-01&to=2026-11-30&equipmentId=nope' }],
      [admin, { method: 'post', path: '/api/bookings' }, { equipmentId: 'nope', startsAt: '2027-01-10T10:00:00Z', endsAt: '2027-01-12T10:00:00Z' }],
      [member, { method: 'post', path: '/api/batches' }, { name: 'x', volumeLiters: 20, bookingId: 'nope' }],
      [treasurer, { method: 'post', path: '/api/manual-charges' }, { memberId: 'nope', period: '2026-11', description: 'x', reason: 'y', amountCents: 100 }],
      [brewer, { method: 'post', path: '/api/transfers' }, { batchId: 'nope', fromEquipmentId: 'nope', toKegIds: ['nope'], volumeLiters: 10, checklist: {} }],
      [brewer, { method: 'post', path: '/api/sanitation-cycles' }, { equipmentId: 'nope', steps: [] }],
      [brewer, { method: 'post', path: '/api/carbonation-plans' }, { kegId: 'nope' }],
    ];
    for (const [client, route, body] of checks) {
      const res = await call(client, route, body);
      expect(res.status, `${route.method} ${route.path}`).toBe(422);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
  });
});

describe('control characters', () => {
  it('refuses ?q=%00 (and other C0 controls, DEL) with 422 naming q on every list route, and on every other GET', async () => {
    const searchLists = [
      '/api/batches',
      '/api/invoices',
      '/api/equipment',
      '/api/kegs',
      '/api/kegs/overdue',
      '/api/sanitation-cycles',
      '/api/sanitation-status',
      '/api/transfers',
      '/api/users',
    ];
    for (const path of searchLists) {
      // The search itself works.
      const ok = await admin.get(`${path}?q=${encodeURIComponent('café 🍺 50%_')}`);
      expect(ok.status, path).toBe(200);
      for (const bad of ['%00', 'pale%00ale', '%01', '%1B', '%7F', '%09', '%0A', '%0D', '%ED%A0%80']) {
        const res = await admin.get(`${path}?q=${bad}`);
        if (bad === '%ED%A0%80') {
          // Bytes that are not UTF-8 arrive as U+FFFD, a character like any other.
          expect(res.status, `${path}?q=${bad}`).toBe(200);
          continue;
        }
        expectProblem(res, 422);
        expect(res.body.errors, `${path}?q=${bad}`).toContainEqual(expect.objectContaining({ path: 'q' }));
      }
    }
    // Any GET, with any query parameter, known to it or not.
    const gets = appRoutes(ctx.app).filter((r) => r.method === 'get' && !paramNames(r.path).length && r.path !== '/api/health');
    expect(gets.length).toBeGreaterThan(searchLists.length);
    for (const route of gets) {
      const res = await admin.get(`${route.path}?anything=a%00b`);
      expect(res.status, route.path).toBe(422);
      expect(res.body.errors).toContainEqual(expect.objectContaining({ path: 'anything' }));
    }
    // Repeated parameters are each checked.
    const res = await admin.get('/api/equipment?kind=keg&kind=%00');
    expectProblem(res, 422);
    expect(res.body.errors[0].path).toBe('kind.1');
  });

  it('refuses a control character in the address (a route parameter)', async () => {
    for (const path of ['/api/batches/%00', `/api/batches/${randomUUID()}%00`, '/api/settings/booking_rules%00', '/api/auth/invitations/abc%01def']) {
      expectProblem(await admin.get(path), 422);
    }
  });

  it('login with NUL or another control character in the e-mail or password is 422 and signs nobody in', async () => {
    const cases: [object, string][] = [
      [{ email: 'admin@example.org\u0000', password: 'cellar-demo' }, 'email'],
      [{ email: '\u0000admin@example.org', password: 'cellar-demo' }, 'email'],
      [{ email: 'admin@example.org', password: 'cellar-demo\u0000' }, 'password'],
      [{ email: 'admin@example.org', password: 'cellar\u001bdemo' }, 'password'],
      [{ email: 'admin@example.org\ud800', password: 'cellar-demo' }, 'email'],
    ];
    const request = (await import('supertest')).default;
    for (const [body, path] of cases) {
      const res = await request(ctx.app).post('/api/auth/login').send(body);
      expectProblem(res, 422);
      expect(res.body.errors).toContainEqual(expect.objectContaining({ path }));
      expect(res.headers['set-cookie'] ?? []).toEqual([]);
    }
    // The account is not locked by them: the right password still signs in.
    const ok = await request(ctx.app).post('/api/auth/login').send({ email: 'admin@example.org', password: 'cellar-demo' });
    expect(ok.status).toBe(200);
  });

  it('refuses control characters in JSON text on write routes, naming the nested field, and changes nothing', async () => {
    const owner = await createMember(ctx.db);
    const client = await ctx.signIn(owner.email);
    const batch = await createBatch(ctx.db, { ownerId: owner.id, name: 'Clean name' });
    const fermenter = await createFermenter(ctx.db, { state: 'ready' });
    const keg = await createKeg(ctx.db, { state: 'ready' });
    const brewer = await ctx.signIn('brewer@example.org');
    const treasurer = await ctx.signIn('treasurer@example.org');
    const counts = () => rowCounts(ctx, ['batch', 'reading', 'sanitation_cycle', 'manual_charge', 'booking']);
    const before = await counts();
    const cases: [Promise<{ status: number; headers: Record<string, string>; body: { status?: number; errors?: unknown[] } }>, string][] = [
      [client.post('/api/batches', { name: 'Pale\u0000Ale', style: 'Pale ale', volumeLiters: 20 }), 'name'],
      [client.post('/api/batches', { name: 'Pale Ale', style: 'Pale ale', volumeLiters: 20, notes: 'ok\u0007' }), 'notes'],
      [client.patch(`/api/batches/${batch.id}`, { style: '\u0000' }), 'style'],
      [client.post(`/api/batches/${batch.id}/readings`, { takenAt: '2026-11-20T09:00:00Z', gravity: 1.05, unit: 'sg', note: 'a\u0008b' }), 'note'],
      [client.post('/api/bookings', { equipmentId: fermenter.id, startsAt: '2027-02-01T10:00:00Z', endsAt: '2027-02-03T10:00:00Z', notes: '\u001f' }), 'notes'],
      [
        brewer.post('/api/sanitation-cycles', {
          equipmentId: keg.id,
          steps: [
            { step: 'clean', at: '2026-11-20T09:00:00Z', note: 'fine' },
            { step: 'rinse', at: '2026-11-20T09:10:00Z', note: 'x\u0000' },
          ],
        }),
        'steps.1.note',
      ],
      [
        treasurer.post('/api/manual-charges', { memberId: owner.id, period: '2026-11', description: 'Hops\u0000', reason: 'typed', amountCents: 100 }),
        'description',
      ],
      [client.patch('/api/auth/me', { name: 'Name\u007f' }), 'name'],
      [admin.put('/api/settings/booking_rules', { ['key\u0000']: 1 }), 'key\u0000'],
      [admin.put('/api/settings/booking_rules', { nested: { deeper: ['ok', 'lone \udc00 half'] } }), 'nested.deeper.1'],
    ];
    for (const [pending, path] of cases) {
      const res = await pending;
      expectProblem(res, 422);
      expect(res.body.errors).toContainEqual(expect.objectContaining({ path }));
    }
    expect(await counts()).toEqual(before);
    expect((await ctx.db.selectFrom('batch').select('style').where('id', '=', batch.id).executeTakeFirstOrThrow()).style).not.toBe('\u0000');
  });

  it('keeps tab and line breaks in body text, where notes need them, and emoji anywhere', async () => {
    const client = await ctx.signIn((await createMember(ctx.db)).email);
    const res = await client.post('/api/batches', { name: 'Tabbed 🍺', style: 'Saison', volumeLiters: 20, notes: 'Line one\r\nLine two\tindented' });
    expect(res.status).toBe(201);
    expect(res.body.batch.notes).toBe('Line one\r\nLine two\tindented');
    expect(res.body.batch.name).toBe('Tabbed 🍺');
  });
});

describe('bodies of the wrong shape', () => {
  const depth = (n: number) => `${'{"a":'.repeat(n)}1${'}'.repeat(n)}`;
  const arrays = (n: number) => `${'['.repeat(n)}${']'.repeat(n)}`;

  it('answers 4xx problem JSON for arrays, scalars, deep nesting and huge numbers on write routes', async () => {
    const owner = await createMember(ctx.db);
    const client = await ctx.signIn(owner.email);
    const batch = await createBatch(ctx.db, { ownerId: owner.id });
    const keg = await createKeg(ctx.db, { state: 'ready' });
    const treasurer = await ctx.signIn('treasurer@example.org');
    const brewer = await ctx.signIn('brewer@example.org');
    const targets: [ApiClient, RouteInfo][] = [
      [client, { method: 'post', path: '/api/batches' }],
      [client, { method: 'patch', path: `/api/batches/${batch.id}` }],
      [client, { method: 'post', path: `/api/batches/${batch.id}/readings` }],
      [client, { method: 'post', path: '/api/bookings' }],
      [client, { method: 'patch', path: '/api/auth/me' }],
      [brewer, { method: 'post', path: '/api/sanitation-cycles' }],
      [brewer, { method: 'post', path: '/api/transfers' }],
      [brewer, { method: 'post', path: '/api/carbonation-plans' }],
      [brewer, { method: 'post', path: `/api/kegs/${keg.id}/check-out` }],
      [treasurer, { method: 'post', path: '/api/manual-charges' }],
      [treasurer, { method: 'post', path: '/api/invoice-runs' }],
      [treasurer, { method: 'put', path: '/api/billing/profile' }],
      [admin, { method: 'put', path: '/api/settings/booking_rules' }],
      [admin, { method: 'post', path: '/api/equipment' }],
    ];
    // Bodies that are no object of fields at all: every write route refuses them.
    const shapes = ['[]', '[{"name":"Pale","volumeLiters":20}]', '"text"', '42', 'null', 'true', depth(40), depth(5000), arrays(10000)];
    const failures: string[] = [];
    const send = async (who: ApiClient, route: RouteInfo, body: string) => {
      const res = await who.agent[route.method](route.path).set('X-CSRF-Token', who.csrf).set('Content-Type', 'application/json').send(body);
      const problem = /application\/problem\+json/.test(res.headers['content-type'] ?? '');
      if (res.status < 400 || res.status >= 500 || !problem) failures.push(`${route.method} ${route.path} ${body.slice(0, 70)}: ${res.status}`);
    };
    for (const [who, route] of targets) for (const body of shapes) await send(who, route, body);
    // Numbers beyond anything a field takes, where the field is.
    const huge: [ApiClient, RouteInfo, string][] = [
      [client, targets[0]![1], '{"name":"Huge","style":"","volumeLiters":1e400}'],
      [client, targets[0]![1], '{"name":"Huge","style":"","volumeLiters":123456789012345678901234567890}'],
      [client, targets[0]![1], '{"name":"Huge","style":"","volumeLiters":20,"targetOg":1e308}'],
      [client, targets[1]![1], '{"packagedLiters":1e400}'],
      [client, targets[1]![1], '{"volumeLiters":-1e308}'],
      [client, targets[2]![1], '{"takenAt":"2026-11-20T09:00:00Z","gravity":1e300,"unit":"sg"}'],
      [client, targets[2]![1], '{"takenAt":"2026-11-20T09:00:00Z","gravity":-1e308,"unit":"plato"}'],
      [client, targets[2]![1], '{"takenAt":"2026-11-20T09:00:00Z","gravity":1e300,"unit":"brix"}'],
      [client, targets[2]![1], '{"takenAt":"+275760-09-13T00:00:00Z","gravity":1.05,"unit":"sg"}'],
      [treasurer, targets[9]![1], `{"amountCents":99999999999999999999,"memberId":"${owner.id}","period":"2026-11","description":"x","reason":"y"}`],
      [treasurer, targets[9]![1], `{"amountCents":2147483648,"memberId":"${owner.id}","period":"2026-11","description":"x","reason":"y"}`],
      [treasurer, targets[10]![1], '{"period":"99999-99"}'],
      [treasurer, targets[10]![1], '{"period":"275760-01"}'],
      [admin, targets[13]![1], '{"kind":"fermenter","name":"Huge","capacityLiters":1e400}'],
      [admin, targets[13]![1], '{"kind":"fermenter","name":"Huge","capacityLiters":1e300}'],
    ];
    for (const [who, route, body] of huge) await send(who, route, body);
    expect(failures).toEqual([]);
    // Nothing came of them.
    expect((await ctx.db.selectFrom('batch').select('id').where('name', '=', 'Huge').execute()).length).toBe(0);
    expect((await ctx.db.selectFrom('equipment').select('id').where('name', '=', 'Huge').execute()).length).toBe(0);
  });

  it('names the depth when a body nests too deep', async () => {
    const res = await member.agent.post('/api/batches').set('X-CSRF-Token', member.csrf).set('Content-Type', 'application/json').send(depth(40));
    expectProblem(res, 422);
    expect(res.body.errors[0].message).toMatch(/Nested more than 32 levels/);
  });
});

describe('the database’s own refusals', () => {
  it('maps invalid text for a type (22P02) and a NUL (22021) to 422, not 500', async () => {
    const { problemHandler } = await import('../../backend/middleware/problem-handler.ts');
    for (const code of ['22P02', '22021']) {
      let status = 0;
      let body: Record<string, unknown> = {};
      const res = {
        headersSent: false,
        status(s: number) {
          status = s;
          return this;
        },
        type() {
          return this;
        },
        json(b: Record<string, unknown>) {
          body = b;
          return this;
        },
      };
      const err = Object.assign(new Error('invalid input syntax for type uuid: "x"'), { code });
      problemHandler(err, { log: { warn() {}, error() {} } } as never, res as never, () => undefined);
      expect(status).toBe(422);
      expect(body).toMatchObject({ status: 422, title: 'Validation failed' });
    }
  });
});
