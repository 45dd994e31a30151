import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { DAY, fillKeg } from '../../db/factories/index.ts';
import { batchPool, fillNewKegs, kegPool } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

let ctx: TestContext;
let brewer: ApiClient, member: ApiClient, member2: ApiClient, treasurer: ApiClient;
let takeKegs: ReturnType<typeof kegPool>;
let takeBatch: ReturnType<typeof batchPool>;

useTestContext(async (created) => {
  ctx = created;
  [brewer, member, member2, treasurer] = await signInAs(ctx, 'brewer', 'member', 'member2', 'treasurer');
  takeKegs = kegPool(ctx);
  takeBatch = batchPool(ctx);
});

const inDays = (d: number) => new Date(ctx.clock.now().getTime() + d * DAY).toISOString();

/** New kegs filled from a new batch through the API. */
async function filledKegs(n: number) {
  const batch = await takeBatch();
  const { kegs } = await fillNewKegs(ctx, brewer, batch, n);
  return { batch, kegs };
}

describe('check-out and return', () => {
  it('checks a keg out to a member with a due date, who then sees it (others do not)', async () => {
    const [keg] = await takeKegs(1);
    const res = await brewer.post(`/api/kegs/${keg!.id}/check-out`, { memberId: member.user.id, dueAt: inDays(14), note: 'For the street party' });
    expect(res.status).toBe(200);
    expect(res.body.keg).toMatchObject({ whereabouts: 'with_member', member: { id: member.user.id }, overdue: false });
    const mine = await member.get('/api/kegs');
    expect(mine.status).toBe(200);
    expect(mine.body.items.map((k: { id: string }) => k.id)).toContain(keg!.id);
    // A member sees only their own kegs, and not who else holds which.
    expect(mine.body.items.every((k: { member: unknown }) => k.member === null)).toBe(true);
    const theirs = await member2.get('/api/kegs');
    expect(theirs.body.items.map((k: { id: string }) => k.id)).not.toContain(keg!.id);
    expect((await member2.get(`/api/kegs/${keg!.id}`)).status).toBe(404);
    expect((await member.get(`/api/kegs/${keg!.id}`)).status).toBe(200);
    const again = await brewer.post(`/api/kegs/${keg!.id}/check-out`, { memberId: member2.user.id, dueAt: inDays(7) });
    expect(again.status).toBe(409);
  });

  it('refuses check-out by a member (403), to a non-member, or with a past due date (422)', async () => {
    const [keg] = await takeKegs(1);
    expect((await member.post(`/api/kegs/${keg!.id}/check-out`, { memberId: member.user.id, dueAt: inDays(7) })).status).toBe(404);
    const treasurerId = treasurer.user.id;
    expect((await brewer.post(`/api/kegs/${keg!.id}/check-out`, { memberId: treasurerId, dueAt: inDays(7) })).status).toBe(422);
    const past = await brewer.post(`/api/kegs/${keg!.id}/check-out`, { memberId: member.user.id, dueAt: inDays(-1) });
    expect(past.status).toBe(422);
    expect(past.body.errors[0].path).toBe('dueAt');
    // The treasurer reads kegs but does not hand them out.
    expect((await treasurer.post(`/api/kegs/${keg!.id}/check-out`, { memberId: member.user.id, dueAt: inDays(7) })).status).toBe(403);
  });

  it('lists kegs past their due date as overdue, and a returned keg needs cleaning', async () => {
    const { kegs } = await filledKegs(1);
    const keg = kegs[0]!;
    await brewer.post(`/api/kegs/${keg.id}/check-out`, { memberId: member2.user.id, dueAt: inDays(3) });
    await ctx.db
      .updateTable('keg_whereabouts')
      .set({ due_at: new Date(ctx.clock.now().getTime() - 2 * DAY) })
      .where('keg_id', '=', keg.id)
      .execute();
    const overdue = await brewer.get('/api/kegs/overdue');
    expect(overdue.status).toBe(200);
    const hit = overdue.body.items.find((k: { id: string }) => k.id === keg.id);
    expect(hit).toMatchObject({ overdue: true, member: { id: member2.user.id } });
    expect(overdue.body.items.every((k: { overdue: boolean }) => k.overdue)).toBe(true);
    // Sorted by due date, oldest first.
    const due = overdue.body.items.map((k: { dueAt: string }) => k.dueAt);
    expect([...due].sort()).toEqual(due);

    const back = await brewer.post(`/api/kegs/${keg.id}/return`, { note: 'Two days late' });
    expect(back.status).toBe(200);
    expect(back.body.keg).toMatchObject({ whereabouts: 'cellar', state: 'needs_cleaning', contents: null, member: null, dueAt: null });
    const fill = await ctx.db
      .selectFrom('keg_fill')
      .select(['emptied_at', 'emptied_reason'])
      .where('keg_id', '=', keg.id)
      .orderBy('filled_at', 'desc')
      .executeTakeFirstOrThrow();
    expect(fill.emptied_reason).toBe('returned');
    expect(fill.emptied_at).not.toBeNull();
    expect((await brewer.post(`/api/kegs/${keg.id}/return`, {})).status).toBe(409);
    const after = await brewer.get('/api/kegs/overdue');
    expect(after.body.items.map((k: { id: string }) => k.id)).not.toContain(keg.id);
  });
});

describe('the cold room and the tap board', () => {
  it('puts a filled keg on a tap, one keg per tap, and shows it on the tap board', async () => {
    const { kegs, batch } = await filledKegs(2);
    const board = await brewer.get('/api/kegs/tap-board');
    const free = board.body.taps.find((t: { taken: boolean; state: string }) => !t.taken && t.state !== 'out_of_service');
    expect(free).toBeTruthy();
    const on = await brewer.post(`/api/kegs/${kegs[0]!.id}/move`, { to: 'cold_room', tapId: free.id });
    expect(on.status).toBe(200);
    expect(on.body.keg).toMatchObject({ whereabouts: 'cold_room', tap: { id: free.id, code: free.code } });
    const clash = await brewer.post(`/api/kegs/${kegs[1]!.id}/move`, { to: 'cold_room', tapId: free.id });
    expect(clash.status).toBe(409);
    expect(clash.body.detail).toContain(kegs[0]!.code);

    await brewer.patch(`/api/kegs/${kegs[0]!.id}/level`, { remainingLiters: 12.5 });
    const shown = await brewer.get('/api/kegs/tap-board');
    const tap = shown.body.taps.find((t: { id: string }) => t.id === free.id);
    expect(tap).toMatchObject({ taken: true, keg: { id: kegs[0]!.id, contents: { batchName: batch.name, remainingLiters: 12.5 } } });
    expect(tap.lineLengthM).toBeGreaterThan(0);

    // Members see which taps are taken, and details only of their own kegs.
    const owner = await ctx.db.selectFrom('app_user').select('email').where('id', '=', batch.ownerId).executeTakeFirstOrThrow();
    const ownerClient = await ctx.signIn(owner.email);
    const outsider = ownerClient.user.id === member2.user.id ? member : member2;
    const theirs = (await ownerClient.get('/api/kegs/tap-board')).body.taps.find((t: { id: string }) => t.id === free.id);
    expect(theirs.keg?.id).toBe(kegs[0]!.id);
    const other = (await outsider.get('/api/kegs/tap-board')).body.taps.find((t: { id: string }) => t.id === free.id);
    expect(other).toMatchObject({ taken: true, keg: null });

    // An empty keg cannot go on a tap; emptying a keg on a tap takes it off and it needs cleaning.
    const [empty] = await takeKegs(1);
    const other2 = shown.body.taps.find((t: { taken: boolean; state: string; id: string }) => !t.taken && t.state !== 'out_of_service' && t.id !== free.id);
    expect((await brewer.post(`/api/kegs/${empty!.id}/move`, { to: 'cold_room', tapId: other2.id })).status).toBe(409);
    const kicked = await brewer.post(`/api/kegs/${kegs[0]!.id}/empty`, {});
    expect(kicked.body.keg).toMatchObject({ state: 'needs_cleaning', whereabouts: 'cold_room', tap: null, contents: null });
    expect((await brewer.get('/api/kegs/tap-board')).body.taps.find((t: { id: string }) => t.id === free.id).taken).toBe(false);
  });

  it('marks a keg missing and found again', async () => {
    const [keg] = await takeKegs(1);
    const lost = await brewer.post(`/api/kegs/${keg!.id}/move`, { to: 'missing', note: 'Not at the stock-take' });
    expect(lost.body.keg.whereabouts).toBe('missing');
    const list = await treasurer.get('/api/kegs?whereabouts=missing');
    expect(list.body.items.map((k: { id: string }) => k.id)).toContain(keg!.id);
    expect((await brewer.post(`/api/kegs/${keg!.id}/check-out`, { memberId: member.user.id, dueAt: inDays(7) })).status).toBe(409);
    const found = await brewer.post(`/api/kegs/${keg!.id}/move`, { to: 'cellar' });
    expect(found.body.keg.whereabouts).toBe('cellar');
  });
});

describe('a keg’s page', () => {
  it('holds its whole history: cleaning, filling, moves, check-out and return', async () => {
    const { kegs, batch } = await filledKegs(1);
    const keg = kegs[0]!;
    await brewer.post(`/api/kegs/${keg.id}/check-out`, { memberId: member.user.id, dueAt: inDays(10) });
    await brewer.post(`/api/kegs/${keg.id}/return`, {});
    const res = await brewer.get(`/api/kegs/${keg.id}/history`);
    expect(res.status).toBe(200);
    const titles = res.body.items.map((e: { title: string }) => e.title);
    expect(titles).toEqual(
      expect.arrayContaining(['Sanitation cycle, complete', `Filled with ${batch.name}`, 'Checked out', 'Returned', 'State: needs cleaning', 'State: holding']),
    );
    // Newest first.
    const times = res.body.items.map((e: { at: string }) => e.at);
    expect([...times].sort().reverse()).toEqual(times);
    expect(res.body.total).toBeGreaterThanOrEqual(titles.length);
    // The whole history names past holders: not for members.
    expect((await member.get(`/api/kegs/${keg.id}/history`)).status).toBe(404);
  });

  it('lists, filters and sorts the fleet on the server', async () => {
    // Three kegs of this test holding beer, beside the fleet the other tests left.
    const filled = [];
    for (let i = 0; i < 3; i++) {
      const [keg] = await takeKegs(1);
      await fillKeg(ctx.db, { kegId: keg!.id, at: new Date(ctx.clock.now().getTime() - (i + 1) * DAY) });
      filled.push(keg!);
    }
    const kegRows = await ctx.db.selectFrom('equipment').select(['id', 'code', 'state']).where('kind', '=', 'keg').execute();
    const all = await brewer.get('/api/kegs?pageSize=100');
    expect(all.status).toBe(200);
    expect(all.body.total).toBe(kegRows.length);
    expect(all.body.items.map((k: { id: string }) => k.id).sort()).toEqual(kegRows.map((k) => k.id).sort());
    const holdingIds = kegRows.filter((k) => k.state === 'holding').map((k) => k.id);
    expect(holdingIds).toEqual(expect.arrayContaining(filled.map((k) => k.id)));
    const holding = await brewer.get('/api/kegs?state=holding&sort=code&order=desc&pageSize=100');
    expect(holding.body.total).toBe(holdingIds.length);
    expect(holding.body.items.map((k: { id: string }) => k.id).sort()).toEqual([...holdingIds].sort());
    const codes = holding.body.items.map((k: { code: string }) => k.code);
    expect([...codes].sort().reverse()).toEqual(codes);
    const page = await brewer.get('/api/kegs?state=holding&sort=code&order=desc&pageSize=2');
    expect(page.body.items.map((k: { code: string }) => k.code)).toEqual(codes.slice(0, 2));
    expect((await brewer.get('/api/kegs?sort=colour')).status).toBe(422);
    expect((await request(ctx.app).get('/api/kegs')).status).toBe(401);
  });
});
