import { describe, expect, it } from 'vitest';
import { createKeg, createTap, DAY, setSetting } from '../../db/factories/index.ts';
import { batchPool, fillNewKegs } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import request from 'supertest';

/**
 * Trace and recall: every keg a batch went into and where each is now, with the allergens, vegan
 * flag and best-before that follow the beer onto the keg, the tap board and Today.
 */

let ctx: TestContext;
let brewer: ApiClient, owner: ApiClient, other: ApiClient, treasurer: ApiClient, admin: ApiClient;
let takeBatch: ReturnType<typeof batchPool>;

useTestContext(async (created) => {
  ctx = created;
  [brewer, owner, other, treasurer, admin] = await signInAs(ctx, 'brewer', 'member', 'member2', 'treasurer', 'admin');
  takeBatch = batchPool(ctx);
});

const inDays = (d: number) => new Date(ctx.clock.now().getTime() + d * DAY).toISOString();

/** The owner's pale ale, transferred through the API into `n` kegs with these finings. */
async function transferred(n: number, finings: { kind: string; amount: number; unit: 'g' | 'mL' } | null, patch: Record<string, unknown> = {}) {
  const batch = await takeBatch({ ownerId: owner.user.id });
  if (Object.keys(patch).length) {
    const res = await owner.patch(`/api/batches/${batch.batchId}`, patch);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
  }
  const { kegs, transfer } = await fillNewKegs(ctx, brewer, batch, n, { finings });
  return { batch, kegs, transferredAt: new Date(transfer.transferredAt) };
}

describe('best-before stored at fill', () => {
  it('is the fill time plus the style’s shelf life, or the batch’s own', async () => {
    // Pale ale: 45 days in the co-op's defaults (shared/cellar/trace.ts, common practice).
    const styled = await transferred(1, null);
    const fill = await ctx.db.selectFrom('keg_fill').select(['filled_at', 'best_before']).where('keg_id', '=', styled.kegs[0]!.id).executeTakeFirstOrThrow();
    expect(fill.best_before!.getTime() - fill.filled_at.getTime()).toBe(45 * DAY);

    const own = await transferred(1, null, { shelfLifeDays: 30 });
    const ownFill = await ctx.db.selectFrom('keg_fill').select(['filled_at', 'best_before']).where('keg_id', '=', own.kegs[0]!.id).executeTakeFirstOrThrow();
    expect(ownFill.best_before!.getTime() - ownFill.filled_at.getTime()).toBe(30 * DAY);
  });

  it('a changed setting applies to later fills only; a stored best-before stays', async () => {
    const before = await transferred(1, null);
    const stored = await ctx.db.selectFrom('keg_fill').select('best_before').where('keg_id', '=', before.kegs[0]!.id).executeTakeFirstOrThrow();
    const saved = await admin.put('/api/settings/shelf_life', { defaultDays: 60, nearDays: 7, byStyle: [{ style: 'pale', days: 20 }] });
    expect(saved.status, JSON.stringify(saved.body)).toBe(200);
    const after = await transferred(1, null);
    const fills = await ctx.db
      .selectFrom('keg_fill')
      .select(['keg_id', 'filled_at', 'best_before'])
      .where('keg_id', 'in', [before.kegs[0]!.id, after.kegs[0]!.id])
      .execute();
    const byKeg = new Map(fills.map((f) => [f.keg_id, f]));
    expect(byKeg.get(before.kegs[0]!.id)!.best_before).toEqual(stored.best_before);
    const a = byKeg.get(after.kegs[0]!.id)!;
    expect(a.best_before!.getTime() - a.filled_at.getTime()).toBe(20 * DAY);
    await setSetting(ctx.db, 'shelf_life', {
      byStyle: [
        { style: 'IPA', days: 45 },
        { style: 'Pale ale', days: 45 },
      ],
    });
  });

  it('refuses a shelf life or allergen list out of range and changes nothing', async () => {
    const batch = await takeBatch({ ownerId: owner.user.id });
    const tooMany = await owner.patch(`/api/batches/${batch.batchId}`, { allergens: Array.from({ length: 21 }, (_, i) => `note ${i}`) });
    expect(tooMany.status).toBe(422);
    expect(tooMany.headers['content-type']).toMatch(/problem\+json/);
    const zero = await owner.patch(`/api/batches/${batch.batchId}`, { shelfLifeDays: 0 });
    expect(zero.status).toBe(422);
    expect(zero.body.errors[0].path).toBe('shelfLifeDays');
    const row = await ctx.db.selectFrom('batch').select(['allergens', 'shelf_life_days']).where('id', '=', batch.batchId).executeTakeFirstOrThrow();
    expect(row).toEqual({ allergens: [], shelf_life_days: null });
  });
});

describe('GET /api/batches/:id/trace', () => {
  it('lists every keg the batch went into and where each is now, with finings, allergens and vegan', async () => {
    const { batch, kegs } = await transferred(3, { kind: 'gelatin', amount: 6, unit: 'g' }, { allergens: ['Gluten (barley)', 'gluten  (wheat)'] });
    const [k1, k2, k3] = kegs as [{ id: string; code: string }, { id: string; code: string }, { id: string; code: string }];
    // One out with another member, one on a tap, one still in the cellar.
    expect((await brewer.post(`/api/kegs/${k1.id}/check-out`, { memberId: other.user.id, dueAt: inDays(14) })).status).toBe(200);
    const tap = await createTap(ctx.db);
    expect((await brewer.post(`/api/kegs/${k2.id}/move`, { to: 'cold_room', tapId: tap.id })).status).toBe(200);

    const res = await brewer.get(`/api/batches/${batch.batchId}/trace`);
    expect(res.status).toBe(200);
    expect(res.body.batch).toMatchObject({ id: batch.batchId, name: batch.name, ownerId: owner.user.id });
    expect(res.body.finings).toEqual([{ kind: 'gelatin', dose: 6, unit: 'g' }]);
    expect(res.body.allergens).toEqual(['gluten (barley)', 'gluten (wheat)']);
    // Gelatin is animal-derived: not vegan (common practice).
    expect(res.body.vegan).toBe(false);
    expect(res.body.fills).toHaveLength(3);
    const byKeg = new Map(res.body.fills.map((f: { kegId: string }) => [f.kegId, f]));
    for (const f of res.body.fills) {
      expect(Object.keys(f)).toEqual(
        expect.arrayContaining(['kegId', 'code', 'filledAt', 'volumeLiters', 'state', 'whereabouts', 'holder', 'tap', 'bestBefore']),
      );
      expect(f.volumeLiters).toBe(19);
      expect(new Date(f.bestBefore).getTime() - new Date(f.filledAt).getTime()).toBe(45 * DAY);
    }
    expect(byKeg.get(k1.id)).toMatchObject({ code: k1.code, whereabouts: 'with_member', holder: { id: other.user.id }, tap: null, state: 'holding' });
    expect(byKeg.get(k2.id)).toMatchObject({ whereabouts: 'cold_room', holder: null, tap: { id: tap.id, code: tap.code } });
    expect(byKeg.get(k2.id)).toMatchObject({ servedOn: [{ tapId: tap.id, code: tap.code }] });
    expect(byKeg.get(k3.id)).toMatchObject({ whereabouts: 'cellar', holder: null, tap: null, holdsBatch: true });
    expect(res.body.totals).toMatchObject({ kegs: 3, liters: 57, holding: 3, withMembers: 1, onTaps: 1 });

    // The keg comes back: it no longer holds the batch, and the trace keeps who took it.
    expect((await brewer.post(`/api/kegs/${k1.id}/return`, {})).status).toBe(200);
    const later = await brewer.get(`/api/batches/${batch.batchId}/trace`);
    const back = later.body.fills.find((f: { kegId: string }) => f.kegId === k1.id);
    expect(back).toMatchObject({ holdsBatch: false, holder: null, whereabouts: 'cellar', takenBy: [{ memberId: other.user.id }] });
    expect(back.emptiedAt).not.toBeNull();
  });

  it('is for the owner, the rota, the treasurer and the admin; another member gets 404', async () => {
    const { batch, kegs } = await transferred(1, { kind: 'silica finings', amount: 20, unit: 'mL' });
    expect((await brewer.post(`/api/kegs/${kegs[0]!.id}/check-out`, { memberId: other.user.id, dueAt: inDays(14) })).status).toBe(200);
    const url = `/api/batches/${batch.batchId}/trace`;
    for (const c of [owner, brewer, treasurer, admin]) expect((await c.get(url)).status, c.user.email).toBe(200);
    const hidden = await other.get(url);
    expect(hidden.status).toBe(404);
    expect(hidden.headers['content-type']).toMatch(/problem\+json/);
    expect((await request(ctx.app).get(url)).status).toBe(401);
    expect((await brewer.get('/api/batches/not-a-uuid/trace')).status).toBe(404);
    // The owner learns the keg is with a member, not which one; the rota sees who.
    const mine = await owner.get(url);
    expect(mine.body.fills[0]).toMatchObject({ whereabouts: 'with_member', holder: null });
    expect(mine.body.fills[0].takenBy[0]).toMatchObject({ memberId: null, name: null });
    expect((await treasurer.get(url)).body.fills[0].holder).toMatchObject({ id: other.user.id });
    // Silica finings are vegan (common practice).
    expect(mine.body.vegan).toBe(true);
  });

  it('answers CSV and PDF', async () => {
    const { batch, kegs } = await transferred(2, { kind: 'isinglass', amount: 15, unit: 'mL' }, { allergens: ['lactose (milk)'] });
    const csv = await brewer.get(`/api/batches/${batch.batchId}/trace.csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/^attachment;.*\.csv/);
    const lines = csv.text
      .replace(/^\ufeff/, '')
      .trim()
      .split('\r\n');
    expect(lines).toHaveLength(3);
    expect(lines[0]).toMatch(/^Batch,Style,Owner,Allergens,Vegan,Keg,Filled/);
    for (const k of kegs) expect(csv.text).toContain(k.code);
    expect(csv.text).toContain('lactose (milk); fish (isinglass)');
    const pdf = await brewer.get(`/api/batches/${batch.batchId}/trace.pdf`).buffer(true);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
    expect((await other.get(`/api/batches/${batch.batchId}/trace.csv`)).status).toBe(404);
    expect((await other.get(`/api/batches/${batch.batchId}/trace.pdf`)).status).toBe(404);
  });
});

describe('GET /api/reports/trace', () => {
  it('lists every fill in the range by batch, on screen, as CSV and as PDF', async () => {
    const a = await transferred(2, { kind: 'gelatin', amount: 5, unit: 'g' });
    const day = ctx.clock.now().toISOString().slice(0, 10);
    const res = await treasurer.get(`/api/reports/trace?from=${day}&to=${day}`);
    expect(res.status).toBe(200);
    const mine = res.body.batches.find((b: { batch: { id: string } }) => b.batch.id === a.batch.batchId);
    expect(mine.fills.map((f: { code: string }) => f.code).sort()).toEqual(a.kegs.map((k) => k.code).sort());
    expect(mine.vegan).toBe(false);
    // A range before the fill holds none of it.
    const earlier = new Date(ctx.clock.now().getTime() - 40 * DAY).toISOString().slice(0, 10);
    const none = await treasurer.get(`/api/reports/trace?from=${earlier}&to=${earlier}`);
    expect(none.body.batches.find((b: { batch: { id: string } }) => b.batch.id === a.batch.batchId)).toBeUndefined();

    const csv = await treasurer.get(`/api/reports/trace?from=${day}&to=${day}&format=csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-disposition']).toMatch(/^attachment;/);
    for (const k of a.kegs) expect(csv.text).toContain(k.code);
    const pdf = await treasurer.get(`/api/reports/trace?from=${day}&to=${day}&format=pdf`).buffer(true);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');

    // A member sees only their own batches.
    const theirs = await other.get(`/api/reports/trace?from=${day}&to=${day}`);
    expect(theirs.status).toBe(200);
    expect(theirs.body.batches.some((b: { batch: { id: string } }) => b.batch.id === a.batch.batchId)).toBe(false);
    const bad = await treasurer.get(`/api/reports/trace?from=${day}&to=2000-01-01`);
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].path).toBe('to');
  });
});

describe('what follows the beer onto the keg, the tap board and Today', () => {
  it('a keg and the tap board show finings, allergens, vegan and best-before', async () => {
    const { kegs } = await transferred(2, { kind: 'gelatin', amount: 4, unit: 'g' }, { allergens: ['gluten (barley)'] });
    expect((await brewer.post(`/api/kegs/${kegs[0]!.id}/check-out`, { memberId: owner.user.id, dueAt: inDays(10) })).status).toBe(200);
    const held = await owner.get(`/api/kegs/${kegs[0]!.id}`);
    expect(held.status).toBe(200);
    expect(held.body.keg.contents).toMatchObject({
      finings: [{ kind: 'gelatin', dose: 4, unit: 'g' }],
      allergens: ['gluten (barley)'],
      vegan: false,
      bestBeforeState: 'ok',
    });
    expect(held.body.keg.contents.bestBefore).toBeTruthy();
    const tap = await createTap(ctx.db);
    expect((await brewer.post(`/api/kegs/${kegs[1]!.id}/move`, { to: 'cold_room', tapId: tap.id })).status).toBe(200);
    const board = await brewer.get('/api/kegs/tap-board');
    const onTap = board.body.taps.find((t: { id: string }) => t.id === tap.id);
    expect(onTap.keg.contents).toMatchObject({ vegan: false, allergens: ['gluten (barley)'], finings: [{ kind: 'gelatin' }] });
  });

  it('Today shows kegs near and past best-before to the rota and to the member who holds them', async () => {
    const { kegs } = await transferred(1, null, { shelfLifeDays: 10 });
    const keg = kegs[0]!;
    expect((await brewer.post(`/api/kegs/${keg.id}/check-out`, { memberId: owner.user.id, dueAt: inDays(30) })).status).toBe(200);
    const listed = (body: { items: { kegId: string }[] }) => body.items.find((i) => i.kegId === keg.id);
    // Ten days' shelf life, seven days' warning: not yet on Today.
    let today = await brewer.get('/api/today');
    expect(today.body.cellar.bestBefore.nearDays).toBe(7);
    expect(listed(today.body.cellar.bestBefore)).toBeUndefined();
    ctx.clock.set(new Date(ctx.clock.now().getTime() + 5 * DAY));
    today = await brewer.get('/api/today');
    expect(listed(today.body.cellar.bestBefore)).toMatchObject({ code: keg.code, state: 'near', whereabouts: 'with_member', memberName: owner.user.name });
    const mine = await owner.get('/api/today');
    expect(listed(mine.body.member.bestBefore)).toMatchObject({ code: keg.code, state: 'near' });
    expect(listed((await other.get('/api/today')).body.member.bestBefore)).toBeUndefined();
    ctx.clock.set(new Date(ctx.clock.now().getTime() + 6 * DAY));
    today = await brewer.get('/api/today');
    expect(listed(today.body.cellar.bestBefore)).toMatchObject({ state: 'past' });
    expect((await owner.get(`/api/kegs/${keg.id}`)).body.keg.contents.bestBeforeState).toBe('past');
    // Returned, the keg holds nothing: off Today.
    expect((await brewer.post(`/api/kegs/${keg.id}/return`, {})).status).toBe(200);
    expect(listed((await brewer.get('/api/today')).body.cellar.bestBefore)).toBeUndefined();
  });
});

it('a keg never filled has no contents to trace', async () => {
  const keg = await createKeg(ctx.db);
  const res = await brewer.get(`/api/kegs/${keg.id}`);
  expect(res.body.keg.contents).toBeNull();
});
