import { describe, expect, it } from 'vitest';
import { createKeg, createKegCheckout, createTap, DAY, fillKeg, HOUR, MINUTE } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

/**
 * Undo of a keg's return, emptying or dump: offered for ten minutes by the app's clock and only while
 * nothing has touched the keg since; it puts back the keg's state, whereabouts, fill and carbonation
 * plan, and the tap it came off, in one transaction with an audit row.
 */
let ctx: TestContext;
let brewer: ApiClient, member: ApiClient, treasurer: ApiClient, admin: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  [brewer, member, treasurer, admin] = await signInAs(ctx, 'brewer', 'member', 'treasurer', 'admin');
});

const ago = (ms: number) => new Date(ctx.clock.now().getTime() - ms);

/** A keg filled two days ago with 18 L of the member's beer, 11.5 L left, with a carbonation plan. */
async function fullKeg(o: { plan?: boolean } = {}) {
  const keg = await createKeg(ctx.db);
  const { fills, batchId } = await fillKeg(ctx.db, { kegId: keg.id, at: ago(2 * DAY), ownerId: fixtureUserId('member') });
  expect((await brewer.patch(`/api/kegs/${keg.id}/level`, { remainingLiters: 11.5 })).status).toBe(200);
  let planId: string | null = null;
  if (o.plan !== false) {
    const plan = await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.4, method: 'set_and_hold', styleFamily: 'Ales' });
    expect(plan.status, JSON.stringify(plan.body)).toBe(201);
    planId = plan.body.plan?.id ?? plan.body.id;
  }
  return { keg, fillId: fills[0]!.id, batchId, planId };
}

const kegRow = async (id: string) => (await brewer.get(`/api/kegs/${id}`)).body.keg;

describe('undo of a return', () => {
  it('puts the keg back with its member, its beer and its carbonation plan, with an audit row', async () => {
    const { keg, fillId, batchId, planId } = await fullKeg();
    const due = new Date(ctx.clock.now().getTime() + 7 * DAY);
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: fixtureUserId('member'), at: ago(HOUR), dueAt: due, actorId: fixtureUserId('brewer') });
    const before = await kegRow(keg.id);
    expect(before).toMatchObject({ state: 'holding', whereabouts: 'with_member', contents: { remainingLiters: 11.5 }, carbonation: { planId } });

    const returned = await brewer.post(`/api/kegs/${keg.id}/return`, {});
    expect(returned.status).toBe(200);
    expect(returned.body.keg).toMatchObject({ state: 'needs_cleaning', whereabouts: 'cellar', contents: null, carbonation: null });
    expect(returned.body.undo).toMatchObject({ action: 'returned' });
    expect(new Date(returned.body.undo.until).getTime()).toBe(new Date(returned.body.undo.until).getTime());
    expect(new Date(returned.body.undo.until).getTime() - ctx.clock.now().getTime()).toBeLessThanOrEqual(10 * MINUTE);

    const undone = await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: returned.body.undo.id });
    expect(undone.status, JSON.stringify(undone.body)).toBe(200);
    expect(undone.body.keg).toMatchObject({
      state: 'holding',
      whereabouts: 'with_member',
      member: { id: fixtureUserId('member') },
      dueAt: due.toISOString(),
      checkedOutAt: before.checkedOutAt,
      contents: { fillId, batchId, remainingLiters: 11.5, volumeLiters: 18 },
      carbonation: { planId },
    });
    const fill = await ctx.db.selectFrom('keg_fill').select(['emptied_at', 'emptied_reason']).where('id', '=', fillId).executeTakeFirstOrThrow();
    expect(fill).toEqual({ emptied_at: null, emptied_reason: null });
    const trail = await admin.get(`/api/audit?subjectType=Keg&subjectId=${keg.id}&sort=at&order=desc`);
    expect(trail.body.items[0]).toMatchObject({ action: 'undone', actorName: expect.any(String), detail: { undid: 'returned' } });
    expect(trail.body.items[0].changes).toEqual(
      expect.arrayContaining([
        { field: 'state', before: 'needs_cleaning', after: 'holding' },
        { field: 'whereabouts', before: 'cellar', after: 'with_member' },
        { field: 'remainingLiters', before: 0, after: 11.5 },
      ]),
    );
    // Once only.
    const twice = await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: returned.body.undo.id });
    expect(twice.status).toBe(409);
    expect(twice.headers['content-type']).toMatch(/application\/problem\+json/);
    // The history says so.
    const history = await brewer.get(`/api/kegs/${keg.id}/history`);
    expect(history.body.items.map((h: { title: string }) => h.title)).toContain('Undone');
  });

  it('is refused after the keg was touched again, changing nothing', async () => {
    const { keg } = await fullKeg({ plan: false });
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: fixtureUserId('member'), at: ago(HOUR), dueAt: new Date(ctx.clock.now().getTime() + 3 * DAY) });
    const returned = await brewer.post(`/api/kegs/${keg.id}/return`, {});
    expect((await brewer.post(`/api/kegs/${keg.id}/move`, { to: 'cold_room' })).status).toBe(200);
    const snapshot = await kegRow(keg.id);
    const refused = await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: returned.body.undo.id });
    expect(refused.status).toBe(409);
    expect(refused.body.detail ?? refused.body.title).toMatch(/changed since/);
    expect(await kegRow(keg.id)).toEqual(snapshot);
  });

  it('is refused after ten minutes by the app clock', async () => {
    const { keg } = await fullKeg({ plan: false });
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: fixtureUserId('member'), at: ago(HOUR), dueAt: new Date(ctx.clock.now().getTime() + 3 * DAY) });
    const returned = await brewer.post(`/api/kegs/${keg.id}/return`, {});
    ctx.clock.advance(10 * MINUTE + 1000);
    const late = await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: returned.body.undo.id });
    expect(late.status).toBe(409);
    expect(late.body.detail ?? late.body.title).toMatch(/Too late/);
    expect(await kegRow(keg.id)).toMatchObject({ whereabouts: 'cellar', contents: null });
  });
});

describe('undo of an emptying or a dump', () => {
  it('puts an emptied keg back on the tap it came off, with its beer, and the tap back to holding', async () => {
    const { keg, fillId, planId } = await fullKeg();
    const tap = await createTap(ctx.db);
    expect((await brewer.post(`/api/kegs/${keg.id}/move`, { to: 'cold_room', tapId: tap.id })).status).toBe(200);
    const emptied = await brewer.post(`/api/kegs/${keg.id}/empty`, {});
    expect(emptied.status).toBe(200);
    expect(emptied.body.keg).toMatchObject({ tap: null, contents: null, state: 'needs_cleaning' });
    expect(emptied.body.undo).toMatchObject({ action: 'emptied' });
    const tapAfter = await ctx.db.selectFrom('equipment').select('state').where('id', '=', tap.id).executeTakeFirstOrThrow();
    expect(tapAfter.state).toBe('needs_cleaning');

    const undone = await brewer.post(`/api/kegs/${keg.id}/undo`, {});
    expect(undone.status, JSON.stringify(undone.body)).toBe(200);
    expect(undone.body.keg).toMatchObject({
      state: 'holding',
      whereabouts: 'cold_room',
      tap: { id: tap.id },
      contents: { fillId, remainingLiters: 11.5 },
      carbonation: { planId },
    });
    const tapNow = await ctx.db.selectFrom('equipment').select('state').where('id', '=', tap.id).executeTakeFirstOrThrow();
    expect(tapNow.state).toBe('holding');
  });

  it('undoes a dump, whose fill the production records then count as still in the keg', async () => {
    const { keg, fillId } = await fullKeg({ plan: false });
    const dumped = await brewer.post(`/api/kegs/${keg.id}/empty`, { dumped: true });
    expect(dumped.body.undo).toMatchObject({ action: 'dumped' });
    expect((await ctx.db.selectFrom('keg_fill').select('emptied_reason').where('id', '=', fillId).executeTakeFirstOrThrow()).emptied_reason).toBe('dumped');
    const undone = await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: dumped.body.undo.id });
    expect(undone.status).toBe(200);
    expect((await ctx.db.selectFrom('keg_fill').select('emptied_reason').where('id', '=', fillId).executeTakeFirstOrThrow()).emptied_reason).toBeNull();
  });

  it('is refused when another keg went on the tap meanwhile', async () => {
    const { keg } = await fullKeg({ plan: false });
    const other = await fullKeg({ plan: false });
    const tap = await createTap(ctx.db);
    await brewer.post(`/api/kegs/${keg.id}/move`, { to: 'cold_room', tapId: tap.id });
    const emptied = await brewer.post(`/api/kegs/${keg.id}/empty`, {});
    expect((await brewer.post(`/api/kegs/${other.keg.id}/move`, { to: 'cold_room', tapId: tap.id })).status).toBe(200);
    const refused = await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: emptied.body.undo.id });
    expect(refused.status).toBe(409);
    expect(await kegRow(keg.id)).toMatchObject({ contents: null, tap: null });
  });

  it('is refused when there is nothing to undo, or for an action that is not the keg’s latest', async () => {
    const { keg } = await fullKeg({ plan: false });
    expect((await brewer.post(`/api/kegs/${keg.id}/undo`, {})).status).toBe(409);
    const emptied = await brewer.post(`/api/kegs/${keg.id}/empty`, {});
    expect((await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: '00000000-0000-4000-8000-000000000000' })).status).toBe(409);
    expect((await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: 'not-an-id' })).status).toBe(422);
    expect((await brewer.post(`/api/kegs/${keg.id}/undo`, { actionId: emptied.body.undo.id })).status).toBe(200);
  });
});

describe('who may undo', () => {
  it('is the brewer on duty or the admin; a member and the treasurer are refused and nothing changes', async () => {
    const { keg } = await fullKeg({ plan: false });
    // The member has it out, so sees the keg, but may not change it.
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: fixtureUserId('member'), at: ago(HOUR), dueAt: new Date(ctx.clock.now().getTime() + 3 * DAY) });
    const emptied = await brewer.post(`/api/kegs/${keg.id}/empty`, {});
    const body = { actionId: emptied.body.undo.id };
    expect((await member.post(`/api/kegs/${keg.id}/undo`, body)).status).toBe(403);
    expect((await treasurer.post(`/api/kegs/${keg.id}/undo`, body)).status).toBe(403);
    expect((await ctx.signIn('member2@example.org').then((c) => c.post(`/api/kegs/${keg.id}/undo`, body))).status).toBe(404);
    expect(await kegRow(keg.id)).toMatchObject({ contents: null });
    expect((await admin.post(`/api/kegs/${keg.id}/undo`, body)).status).toBe(200);
    expect(await kegRow(keg.id)).toMatchObject({ state: 'holding', contents: { remainingLiters: 11.5 } });
  });
});
