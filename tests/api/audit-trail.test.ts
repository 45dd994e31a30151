import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { createAuditEntry, createUser, DAY, HOUR } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

/**
 * `GET /api/audit`, the audit trail behind its screen: filtered by person, record and time,
 * sorted through an allowlist and paged on the server, with the changed fields read out of each
 * row; for the admin only.
 */
let ctx: TestContext;
let admin: ApiClient, brewer: ApiClient, treasurer: ApiClient, member: ApiClient;
let actor: { id: string; name: string };
let other: { id: string; name: string };
const recordId = '7d0c3a52-1a0b-4c55-9f1e-5e1f1b2c3d4e';
/** The clock's now when the rows were made (the test clock runs on). */
let now: number;

useTestContext(async (created) => {
  ctx = created;
  [admin, brewer, treasurer, member] = await signInAs(ctx, 'admin', 'brewer', 'treasurer', 'member');
  actor = await createUser(ctx.db, { name: 'Ingrid Tallow', roles: ['brewer_on_duty'] });
  other = await createUser(ctx.db, { name: 'Oskar Brine', roles: ['treasurer'] });
  now = ctx.clock.now().getTime();
  // Five days of one person's changes, one a day, and two of another's on the same record.
  for (let d = 5; d >= 1; d--) {
    await createAuditEntry(ctx.db, {
      at: new Date(now - d * DAY),
      actorId: actor.id,
      action: d % 2 ? 'state_changed' : 'updated',
      subjectType: 'Equipment',
      subjectId: `eq-${d}`,
      detail: { from: 'ready', to: 'holding' },
    });
  }
  const onTheRecord: [at: number, action: string, detail: Record<string, unknown>][] = [
    [now - 3 * DAY + HOUR, 'payment_recorded', { amountCents: 4200 }],
    [now - 2 * DAY + HOUR, 'updated', { before: { dueOn: '2026-12-10', lines: 2 }, after: { dueOn: '2026-12-17', lines: 2 } }],
  ];
  for (const [at, action, detail] of onTheRecord) {
    await createAuditEntry(ctx.db, { at: new Date(at), actorId: other.id, action, subjectType: 'Invoice', subjectId: recordId, detail });
  }
});

const ids = (body: { items: { subjectId: string }[] }) => body.items.map((i) => i.subjectId);

describe('the audit trail', () => {
  it('filters by person, newest first, with who, when and what', async () => {
    const res = await admin.get(`/api/audit?actorId=${actor.id}`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(5);
    expect(ids(res.body)).toEqual(['eq-1', 'eq-2', 'eq-3', 'eq-4', 'eq-5']);
    expect(res.body.items[0]).toMatchObject({
      actorId: actor.id,
      actorName: 'Ingrid Tallow',
      action: 'state_changed',
      subjectType: 'Equipment',
      detail: { from: 'ready', to: 'holding' },
    });
    expect(res.body.items[0].changes).toEqual([{ field: 'from → to', before: 'ready', after: 'holding' }]);
  });

  it('filters by record type and id, and reads before and after as the changed fields only', async () => {
    const res = await admin.get(`/api/audit?subjectType=Invoice&subjectId=${recordId}`);
    expect(res.body.total).toBe(2);
    expect(res.body.items.map((i: { action: string }) => i.action)).toEqual(['updated', 'payment_recorded']);
    expect(res.body.items[0].changes).toEqual([{ field: 'dueOn', before: '2026-12-10', after: '2026-12-17' }]);
    expect(res.body.items[1].changes).toEqual([{ field: 'amountCents', before: null, after: 4200 }]);
    expect((await admin.get('/api/audit?subjectType=Equipment&subjectId=eq-3')).body.total).toBe(1);
  });

  it('filters by a time range: from inclusive, to exclusive', async () => {
    const from = new Date(now - 4 * DAY).toISOString();
    const to = new Date(now - 2 * DAY).toISOString();
    const res = await admin.get(`/api/audit?actorId=${actor.id}&from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`);
    expect(ids(res.body)).toEqual(['eq-3', 'eq-4']);
    const since = await admin.get(`/api/audit?subjectType=Invoice&from=${encodeURIComponent(new Date(now - 2 * DAY).toISOString())}`);
    expect(since.body.items.map((i: { action: string }) => i.action)).toEqual(['updated']);
  });

  it('pages and sorts on the server through an allowlist', async () => {
    const first = await admin.get(`/api/audit?actorId=${actor.id}&pageSize=2&page=1`);
    const third = await admin.get(`/api/audit?actorId=${actor.id}&pageSize=2&page=3`);
    expect(first.body).toMatchObject({ total: 5, page: 1, pageSize: 2 });
    expect(ids(first.body)).toEqual(['eq-1', 'eq-2']);
    expect(ids(third.body)).toEqual(['eq-5']);
    const oldest = await admin.get(`/api/audit?actorId=${actor.id}&sort=at&order=asc&pageSize=1`);
    expect(ids(oldest.body)).toEqual(['eq-5']);
    const byAction = await admin.get(`/api/audit?actorId=${actor.id}&sort=action&order=asc`);
    expect(byAction.body.items.map((i: { action: string }) => i.action)).toEqual(['state_changed', 'state_changed', 'state_changed', 'updated', 'updated']);
    const byActor = await admin.get(`/api/audit?subjectType=Invoice&subjectId=${recordId}&sort=actor&order=asc`);
    expect(byActor.status).toBe(200);
    for (const bad of ['sort=detail', 'sort=at;drop', 'order=sideways', 'pageSize=1000', 'from=yesterday', 'actorId=nope']) {
      const res = await admin.get(`/api/audit?${bad}`);
      expect(res.status, bad).toBe(422);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
  });

  it('records a settings change with its before and after, shown as the fields that changed', async () => {
    const current = (await admin.get('/api/settings/shelf_life')).body.value;
    const saved = await admin.put('/api/settings/shelf_life', { ...current, nearDays: current.nearDays + 3 });
    expect(saved.status).toBe(200);
    const res = await admin.get(`/api/audit?subjectType=Setting&subjectId=shelf_life&actorId=${admin.user.id}`);
    expect(res.body.items[0]).toMatchObject({ action: 'updated', actorName: admin.user.name });
    expect(res.body.items[0].changes).toEqual([{ field: 'nearDays', before: current.nearDays, after: current.nearDays + 3 }]);
  });

  it('is for the admin only', async () => {
    for (const c of [brewer, treasurer, member]) expect((await c.get('/api/audit')).status).toBe(403);
    expect((await request(ctx.app).get('/api/audit')).status).toBe(401);
  });
});
