import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { abv } from '../../shared/brewing/index.ts';
import { createBatch, createKeg, DAY } from '../../db/factories/index.ts';
import { batchPool, fullChecklist, kegPool, makeReady, minutesAgo, readyKegPool, states, transferBody, transferSnapshot } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

let ctx: TestContext;
let brewer: ApiClient, member: ApiClient, treasurer: ApiClient;
let takeKegs: ReturnType<typeof kegPool>;
let takeReadyKegs: ReturnType<typeof readyKegPool>;
let takeBatch: ReturnType<typeof batchPool>;
/** Refused transfers change nothing, so they can all use one batch. */
let refused: Awaited<ReturnType<ReturnType<typeof batchPool>>>;

useTestContext(async (created) => {
  ctx = created;
  [brewer, member, treasurer] = await signInAs(ctx, 'brewer', 'member', 'treasurer');
  takeKegs = kegPool(ctx);
  takeReadyKegs = readyKegPool(ctx, brewer);
  takeBatch = batchPool(ctx);
  refused = await takeBatch();
});

describe('a transfer from a fermenter into ready kegs', () => {
  it('fills the kegs with the batch (OG, FG, ABV copied), empties the fermenter and records volumes and loss, in one go', async () => {
    const batch = await takeBatch();
    const kegs = await takeReadyKegs(2);
    const res = await brewer.post(
      '/api/transfers',
      transferBody(batch, kegs, {
        volumeLiters: 21,
        kegVolumesLiters: [10.5, 9.5],
        checklist: { ...fullChecklist, oxygenPickupNote: 'Bubbles at the keg barb; tightened' },
        finings: { kind: 'gelatin', amount: 2, unit: 'g' },
      }),
    );
    expect(res.status).toBe(201);
    const t = res.body.transfer;
    expect(t).toMatchObject({
      volumeLiters: 21,
      packagedLiters: 20,
      lossLiters: 1,
      drawMethod: 'bottom_valve',
      finings: { kind: 'gelatin', amount: 2, unit: 'g' },
      unconfirmed: [],
    });
    expect(t.kegs.map((k: { code: string; volumeLiters: number }) => [k.code, k.volumeLiters]).sort()).toEqual(
      [
        [kegs[0]!.code, 10.5],
        [kegs[1]!.code, 9.5],
      ].sort(),
    );
    expect(t.checklist.oxygenPickupNote).toMatch(/barb/);
    expect(t.co2Grams).toBe(80); // two kegs at the co-op's usual 40 g
    expect(res.body.warnings).toEqual([]);

    // The batch's own figures, from its readings: OG the first, FG the latest now that it is packaged.
    const readings = await ctx.db.selectFrom('reading').select(['gravity_sg']).where('batch_id', '=', batch.batchId).orderBy('taken_at').execute();
    const og = Number(readings[0]!.gravity_sg);
    const fg = Number(readings[readings.length - 1]!.gravity_sg);
    expect(t.og).toBeCloseTo(og, 4);
    expect(t.fg).toBeCloseTo(fg, 4);
    expect(t.abv).toBeCloseTo(abv(og, fg), 2);

    const fills = await ctx.db.selectFrom('keg_fill').selectAll().where('transfer_id', '=', t.id).execute();
    expect(fills).toHaveLength(2);
    for (const f of fills) {
      expect(f).toMatchObject({ batch_id: batch.batchId, emptied_at: null });
      expect(Number(f.og)).toBeCloseTo(og, 4);
      expect(Number(f.abv)).toBeCloseTo(abv(og, fg), 2);
      expect(f.sanitation_cycle_id).toBeTruthy();
      expect(Number(f.remaining_liters)).toBe(Number(f.volume_liters));
    }
    const now = await states(ctx, [...kegs.map((k) => k.id), batch.fermenterId]);
    expect(now[kegs[0]!.id]).toBe('holding');
    expect(now[kegs[1]!.id]).toBe('holding');
    expect(now[batch.fermenterId]).toBe('needs_cleaning');
    const b = await ctx.db.selectFrom('batch').select(['status', 'packaged_liters', 'packaged_at']).where('id', '=', batch.batchId).executeTakeFirstOrThrow();
    expect(b.status).toBe('packaged');
    expect(Number(b.packaged_liters)).toBe(20);

    // The keg's page shows what it holds, for the label.
    const keg = await brewer.get(`/api/kegs/${kegs[0]!.id}`);
    expect(keg.body.keg).toMatchObject({ state: 'holding', contents: { batchId: batch.batchId, batchName: batch.name } });
    expect(keg.body.keg.contents.abv).toBeCloseTo(abv(og, fg), 2);
    // The batch's owner sees their own keg; the production records read the transfer.
    const ownerPacked = await ctx.db.selectFrom('production_packaging').selectAll().where('batch_id', '=', batch.batchId).execute();
    expect(ownerPacked.map((p) => Number(p.liters))).toEqual([20]);
    const one = await treasurer.get(`/api/transfers/${t.id}`);
    expect(one.status).toBe(200);
    const list = await brewer.get(`/api/transfers?batchId=${batch.batchId}`);
    expect(list.body.total).toBe(1);
  });

  it('shares the volume less the loss evenly when no per-keg volumes are given, and names unconfirmed checklist items', async () => {
    const batch = await takeBatch();
    const kegs = await takeReadyKegs(3);
    const { leakChecked: _skip, ...partial } = fullChecklist;
    const res = await brewer.post(
      '/api/transfers',
      transferBody(batch, kegs, { volumeLiters: 50, lossLiters: 2.5, checklist: partial, finings: { kind: 'silica finings', dose: 15 } }),
    );
    expect(res.status).toBe(201);
    expect(res.body.transfer.kegs.map((k: { volumeLiters: number }) => k.volumeLiters).reduce((a: number, b: number) => a + b, 0)).toBeCloseTo(47.5, 2);
    expect(res.body.transfer.finings).toEqual({ kind: 'silica finings', amount: 15, unit: 'mL' });
    expect(res.body.transfer.unconfirmed).toEqual(['leakChecked']);
    expect(res.body.warnings[0]).toMatch(/leak-checked/);
  });
});

describe('refusals', () => {
  it('answers 409 when any keg is not ready, and changes nothing', async () => {
    const batch = refused;
    const kegs = await takeKegs(2);
    await makeReady(brewer, [kegs[0]!.id], ctx.clock);
    await ctx.db.updateTable('equipment').set({ state: 'needs_cleaning' }).where('id', '=', kegs[1]!.id).execute();
    const before = await transferSnapshot(ctx, batch.batchId, [...kegs.map((k) => k.id), batch.fermenterId]);
    const res = await brewer.post('/api/transfers', transferBody(batch, kegs, { volumeLiters: 20 }));
    expect(res.status).toBe(409);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.body.detail).toContain(kegs[1]!.code);
    expect(res.body.kegs).toEqual([expect.objectContaining({ id: kegs[1]!.id, state: 'needs_cleaning' })]);
    expect(await transferSnapshot(ctx, batch.batchId, [...kegs.map((k) => k.id), batch.fermenterId])).toEqual(before);
  });

  it('answers 409 for a keg stored as ready whose freshness window has lapsed, or that has no cycle on record', async () => {
    const batch = refused;
    const [stale] = await takeKegs(1);
    const old = (m: number) => minutesAgo(ctx.clock, m);
    const days = 9 * 24 * 60;
    await brewer.post('/api/sanitation-cycles', {
      equipmentId: stale!.id,
      steps: [
        { step: 'clean', chemical: 'alkaline-cleaner', contactMinutes: 60, at: old(days + 90) },
        { step: 'rinse', at: old(days + 25) },
        { step: 'sanitize', chemical: 'acid-sanitizer', contactMinutes: 2, at: old(days + 10) },
        { step: 'purge', contactMinutes: 0.5, at: old(days) },
      ],
    });
    // A keg registered as ready with no cleaning on record (as imported history may have it).
    const bare = await createKeg(ctx.db, { name: '19 L ball lock keg, new', state: 'ready' });
    const res = await brewer.post('/api/transfers', {
      batchId: batch.batchId,
      fromEquipmentId: batch.fermenterId,
      toKegIds: [stale!.id, bare.id],
      volumeLiters: 20,
      checklist: fullChecklist,
    });
    expect(res.status).toBe(409);
    const reasons = Object.fromEntries(res.body.kegs.map((k: { id: string; reason: string }) => [k.id, k.reason]));
    expect(reasons[stale!.id]).toMatch(/freshness window has lapsed/);
    expect(reasons[bare.id]).toMatch(/no sanitation cycle/);
  });

  it('lets neither a member nor the treasurer record a transfer (403), and nothing is written', async () => {
    const batch = refused;
    const kegs = await takeReadyKegs(1);
    const before = await transferSnapshot(ctx, batch.batchId, [kegs[0]!.id, batch.fermenterId]);
    for (const who of [member, treasurer]) {
      const res = await who.post('/api/transfers', transferBody(batch, [kegs[0]!], { volumeLiters: 19 }));
      expect(res.status).toBe(403);
    }
    expect(await transferSnapshot(ctx, batch.batchId, [kegs[0]!.id, batch.fermenterId])).toEqual(before);
    expect((await member.get('/api/transfers')).status).toBe(403);
  });

  it('validates volumes, kegs and the batch', async () => {
    const batch = refused;
    const kegs = await takeReadyKegs(2);
    const base = { batchId: batch.batchId, fromEquipmentId: batch.fermenterId, toKegIds: kegs.map((k) => k.id), checklist: fullChecklist };
    const over = await brewer.post('/api/transfers', { ...base, volumeLiters: 20, kegVolumesLiters: [12, 12] });
    expect(over.status).toBe(422);
    expect(over.body.errors[0].path).toBe('kegVolumesLiters');
    const tooBig = await brewer.post('/api/transfers', { ...base, volumeLiters: 60 });
    expect(tooBig.status).toBe(422);
    expect(tooBig.body.detail).toMatch(/holds 19 L/);
    const twice = await brewer.post('/api/transfers', { ...base, toKegIds: [kegs[0]!.id, kegs[0]!.id], volumeLiters: 20 });
    expect(twice.status).toBe(422);
    const fromKeg = await brewer.post('/api/transfers', { ...base, fromEquipmentId: kegs[1]!.id, toKegIds: [kegs[0]!.id], volumeLiters: 10 });
    expect(fromKeg.status).toBe(422);
    const planned = await createBatch(ctx.db, { status: 'planned' });
    const notBrewed = await brewer.post('/api/transfers', { ...base, batchId: planned.id, volumeLiters: 20 });
    expect(notBrewed.status).toBe(409);
    expect(
      await states(
        ctx,
        kegs.map((k) => k.id),
      ),
    ).toEqual(Object.fromEntries(kegs.map((k) => [k.id, 'ready'])));
  });
});

describe('all or nothing', () => {
  it('leaves no partial transfer when a write fails mid-way', async () => {
    const batch = await takeBatch();
    const kegs = await takeReadyKegs(3);
    const ids = kegs.map((k) => k.id);
    // The database refuses the third keg's fill, after the first two were written in the transaction.
    await sql`create or replace function cw_test_refuse_fill() returns trigger language plpgsql as $$
      begin if new.keg_id = ${sql.lit(ids[2]!)}::uuid then raise exception 'disk full'; end if; return new; end $$`.execute(ctx.db);
    await sql`create trigger cw_test_refuse_fill before insert on keg_fill for each row execute function cw_test_refuse_fill()`.execute(ctx.db);
    const before = await transferSnapshot(ctx, batch.batchId, [...ids, batch.fermenterId]);
    try {
      const res = await brewer.post('/api/transfers', {
        batchId: batch.batchId,
        fromEquipmentId: batch.fermenterId,
        toKegIds: ids,
        volumeLiters: 45,
        checklist: fullChecklist,
      });
      expect(res.status).toBe(500);
      expect(res.headers['content-type']).toMatch(/problem\+json/);
    } finally {
      await sql`drop trigger cw_test_refuse_fill on keg_fill`.execute(ctx.db);
    }
    expect(await transferSnapshot(ctx, batch.batchId, [...ids, batch.fermenterId])).toEqual(before);
    // And it goes through once the fault is gone.
    const retry = await brewer.post('/api/transfers', {
      batchId: batch.batchId,
      fromEquipmentId: batch.fermenterId,
      toKegIds: ids,
      volumeLiters: 45,
      checklist: fullChecklist,
    });
    expect(retry.status).toBe(201);
  });

  it('answers 409 and writes nothing when a keg turns out to hold a fill already', async () => {
    const batch = refused;
    const other = await createBatch(ctx.db, { status: 'packaged' });
    const kegs = await takeReadyKegs(2);
    // Corrected history left an open fill on a keg that reads as ready.
    await ctx.db
      .insertInto('keg_fill')
      .values({ keg_id: kegs[1]!.id, batch_id: other.id, volume_liters: 5, remaining_liters: 5, filled_at: new Date(ctx.clock.now().getTime() - DAY) })
      .execute();
    const before = await transferSnapshot(ctx, batch.batchId, [...kegs.map((k) => k.id), batch.fermenterId]);
    const res = await brewer.post('/api/transfers', transferBody(batch, kegs, { volumeLiters: 30 }));
    expect(res.status).toBe(409);
    expect(await transferSnapshot(ctx, batch.batchId, [...kegs.map((k) => k.id), batch.fermenterId])).toEqual(before);
  });
});
