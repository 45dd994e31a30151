import { describe, expect, it } from 'vitest';
import { addReadings, DAY, setSetting } from '../../db/factories/index.ts';
import { batchPool, fullChecklist, minutesAgo, readyKegPool, transferBody, transferSnapshot } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';

// What a transfer checks of the batch besides the kegs: that its gravity is stable (or a reason is
// given), its start and end times, and dissolved oxygen. The transfer itself is tests/api/transfers.test.ts's.

let ctx: TestContext;
let brewer: ApiClient;
let takeReadyKegs: ReturnType<typeof readyKegPool>;
let takeBatch: ReturnType<typeof batchPool>;

useTestContext(async (created) => {
  ctx = created;
  brewer = await ctx.signIn('brewer@example.org');
  takeReadyKegs = readyKegPool(ctx, brewer);
  takeBatch = batchPool(ctx);
});

describe('the stable-gravity guard, start and end times, dissolved oxygen', () => {
  /** A batch in a fermenter whose gravity still falls: 1.052 → 1.020 → 1.016 over the last days. */
  async function fallingBatch() {
    const pooled = await takeBatch();
    await ctx.db.deleteFrom('reading').where('batch_id', '=', pooled.batchId).execute();
    const now = ctx.clock.now().getTime();
    await addReadings(ctx.db, pooled.batchId, [
      { takenAt: new Date(now - 8 * DAY), value: 1.052 },
      { takenAt: new Date(now - 3 * DAY), value: 1.02 },
      { takenAt: new Date(now - 1 * DAY), value: 1.016 },
    ]);
    return pooled;
  }

  it('answers 422 with the last readings and what the rule needs when the gravity is not stable, and changes nothing', async () => {
    const batch = await fallingBatch();
    const kegs = await takeReadyKegs(1);
    const before = await transferSnapshot(ctx, batch.batchId, [kegs[0]!.id, batch.fermenterId]);
    const res = await brewer.post('/api/transfers', transferBody(batch, [kegs[0]!], { volumeLiters: 19 }));
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.body).toMatchObject({ title: 'Gravity not stable', code: 'gravity_not_stable' });
    expect(res.body.detail).toMatch(/not stable/);
    expect(res.body.detail).toMatch(/±0\.001 over 3 days/); // the co-op's default rule (Settings, fermentation)
    expect(res.body.detail).toMatch(/1\.016/);
    expect(res.body.errors).toEqual([expect.objectContaining({ path: 'unstableGravityReason' })]);
    expect(res.body.stability).toMatchObject({ stable: false, toleranceSg: 0.001, spanDays: 3, heldDays: 0 });
    expect(res.body.stability.readings.map((r: { sg: number }) => r.sg)).toEqual([1.052, 1.02, 1.016]);
    expect(await transferSnapshot(ctx, batch.batchId, [kegs[0]!.id, batch.fermenterId])).toEqual(before);

    // The candidates list says so before anyone tries.
    const candidates = await brewer.get('/api/transfers/candidates');
    const mine = candidates.body.items.find((c: { batchId: string }) => c.batchId === batch.batchId);
    expect(mine.gravity).toMatchObject({ stable: false, spanDays: 3 });
  });

  it('follows the co-op setting: a wider tolerance makes the same readings stable', async () => {
    const batch = await fallingBatch();
    await setSetting(ctx.db, 'fermentation', { stableToleranceSg: 0.005, stableSpanDays: 2 });
    try {
      const candidates = await brewer.get('/api/transfers/candidates');
      const mine = candidates.body.items.find((c: { batchId: string }) => c.batchId === batch.batchId);
      // 1.020 and 1.016 lie within ±0.005 of each other, two days apart.
      expect(mine.gravity).toMatchObject({ stable: true, toleranceSg: 0.005, spanDays: 2, heldDays: 2 });
    } finally {
      await setSetting(ctx.db, 'fermentation', { stableToleranceSg: 0.001, stableSpanDays: 3 });
    }
  });

  it('records the transfer with the reason given, its start and end, and dissolved oxygen at fill and per keg', async () => {
    const batch = await fallingBatch();
    const kegs = await takeReadyKegs(2);
    const startedAt = minutesAgo(ctx.clock, 25);
    const endedAt = minutesAgo(ctx.clock, 5);
    const res = await brewer.post(
      '/api/transfers',
      transferBody(batch, kegs, {
        volumeLiters: 36,
        unstableGravityReason: '  Fermenter needed for the next brew; at target gravity  ',
        startedAt,
        endedAt,
        dissolvedOxygenPpb: 48,
        kegDissolvedOxygenPpb: [35.5, null],
      }),
    );
    expect(res.status).toBe(201);
    const t = res.body.transfer;
    expect(t).toMatchObject({
      unstableGravityReason: 'Fermenter needed for the next brew; at target gravity',
      startedAt,
      endedAt,
      transferredAt: endedAt, // the end is the transfer's time
      dissolvedOxygenPpb: 48,
    });
    const byKeg = Object.fromEntries(t.kegs.map((k: { kegId: string; dissolvedOxygenPpb: number | null }) => [k.kegId, k.dissolvedOxygenPpb]));
    expect(byKeg).toEqual({ [kegs[0]!.id]: 35.5, [kegs[1]!.id]: null });
    const row = await ctx.db.selectFrom('transfer').selectAll().where('id', '=', t.id).executeTakeFirstOrThrow();
    expect(row.unstable_gravity_reason).toBe('Fermenter needed for the next brew; at target gravity');
    expect(row.ended_at!.toISOString()).toBe(endedAt);
    expect(row.transferred_at.toISOString()).toBe(endedAt);
    expect(Number(row.dissolved_oxygen_ppb)).toBe(48);
    const fills = await ctx.db.selectFrom('keg_fill').select(['keg_id', 'filled_at']).where('transfer_id', '=', t.id).execute();
    for (const f of fills) expect(f.filled_at.toISOString()).toBe(endedAt);
    // Shown again on the transfer's own page.
    const again = await brewer.get(`/api/transfers/${t.id}`);
    expect(again.body.transfer).toMatchObject({ dissolvedOxygenPpb: 48, startedAt, endedAt, unstableGravityReason: expect.stringMatching(/next brew/) });
    // And on each keg's page, while it holds the beer.
    expect((await brewer.get(`/api/kegs/${kegs[0]!.id}`)).body.keg.contents.dissolvedOxygenPpb).toBe(35.5);
    expect((await brewer.get(`/api/kegs/${kegs[1]!.id}`)).body.keg.contents.dissolvedOxygenPpb).toBeNull();
  });

  it('stores no reason when the gravity is stable, and no times when none are given', async () => {
    const batch = await takeBatch();
    const kegs = await takeReadyKegs(1);
    const res = await brewer.post('/api/transfers', transferBody(batch, [kegs[0]!], { volumeLiters: 19, unstableGravityReason: 'Just in case' }));
    expect(res.status).toBe(201);
    expect(res.body.transfer).toMatchObject({ unstableGravityReason: null, startedAt: null, endedAt: null, dissolvedOxygenPpb: null });

    // A start alone: the transfer ends when it is recorded, by the server's clock.
    const batch2 = await takeBatch();
    const kegs2 = await takeReadyKegs(1);
    ctx.clock.freeze();
    try {
      const startedAt = minutesAgo(ctx.clock, 30);
      const now = ctx.clock.now().toISOString();
      const res2 = await brewer.post('/api/transfers', transferBody(batch2, [kegs2[0]!], { volumeLiters: 19, startedAt }));
      expect(res2.status).toBe(201);
      expect(res2.body.transfer).toMatchObject({ startedAt, endedAt: now, transferredAt: now });
    } finally {
      ctx.clock.resume();
    }
  });

  it('validates the times and the dissolved oxygen, and a refused transfer changes nothing', async () => {
    const batch = await takeBatch(); // a refused transfer changes nothing of it
    const kegs = await takeReadyKegs(2);
    const base = { batchId: batch.batchId, fromEquipmentId: batch.fermenterId, toKegIds: kegs.map((k) => k.id), volumeLiters: 30, checklist: fullChecklist };
    const ids = [...kegs.map((k) => k.id), batch.fermenterId];
    const before = await transferSnapshot(ctx, batch.batchId, ids);
    const now = ctx.clock.now().getTime();
    const iso = (ms: number) => new Date(ms).toISOString();
    const cases: [Record<string, unknown>, string][] = [
      [{ startedAt: iso(now - 10 * 60_000), endedAt: iso(now - 20 * 60_000) }, 'endedAt'], // end before start
      [{ startedAt: iso(now - 10 * 60_000), endedAt: iso(now - 10 * 60_000) }, 'endedAt'], // no time at all
      [{ startedAt: iso(now - 10 * 60_000), endedAt: iso(now + 60_000) }, 'endedAt'], // ends in the future by the clock
      [{ endedAt: iso(now - 10 * 60_000) }, 'startedAt'], // an end without a start
      [{ startedAt: iso(now + 5 * 60_000) }, 'startedAt'], // a start alone ends now: it must come before
      [{ startedAt: iso(now - 30 * 3_600_000), endedAt: iso(now - 60_000) }, 'startedAt'], // more than a day
      [{ startedAt: iso(now - 20 * 60_000), endedAt: iso(now - 5 * 60_000), transferredAt: iso(now - 60_000) }, 'transferredAt'],
      [{ dissolvedOxygenPpb: -1 }, 'dissolvedOxygenPpb'],
      [{ dissolvedOxygenPpb: 10_001 }, 'dissolvedOxygenPpb'],
      [{ kegDissolvedOxygenPpb: [40] }, 'kegDissolvedOxygenPpb'],
      [{ kegDissolvedOxygenPpb: [40, 20_000] }, 'kegDissolvedOxygenPpb.1'],
    ];
    for (const [extra, path] of cases) {
      const res = await brewer.post('/api/transfers', { ...base, ...extra });
      expect(res.status, JSON.stringify(extra)).toBe(422);
      expect(
        res.body.errors.map((e: { path: string }) => e.path),
        JSON.stringify(extra),
      ).toContain(path);
    }
    expect(await transferSnapshot(ctx, batch.batchId, ids)).toEqual(before);
    // The database holds the same rules.
    const t = await ctx.db.selectFrom('transfer').select('id').limit(1).executeTakeFirstOrThrow();
    await expect(ctx.db.updateTable('transfer').set({ dissolved_oxygen_ppb: 10_001 }).where('id', '=', t.id).execute()).rejects.toThrow(/dissolved_oxygen/);
    await expect(
      ctx.db
        .updateTable('transfer')
        .set({ started_at: new Date(now), ended_at: new Date(now - 60_000) })
        .where('id', '=', t.id)
        .execute(),
    ).rejects.toThrow(/transfer_times/);
  });
});
