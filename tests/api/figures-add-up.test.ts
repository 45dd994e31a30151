import { describe, expect, it } from 'vitest';
import { createBatch, createBooking, createFermenter, createKeg, createSanitationCycle, DAY, HOUR, setEquipmentState } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type TestContext, useTestContext } from '../helpers/context.ts';

let ctx: TestContext;
const t = (days: number) => new Date(ctx.clock.now().getTime() + days * DAY);
const made = { dirty: '', clean: '', lapsed: '', staleState: '', handovers: [] as string[], steady: '', stopped: '' };

useTestContext(async (created) => {
  ctx = created;
  const member = fixtureUserId('member');

  // Vessels: one to clean; one cleaned and sanitized yesterday; one whose freshness window ran out
  // without the periodic job having written it down; one whose stored state says "clean me" though a
  // complete cycle ended after its last use and is still fresh.
  made.dirty = (await createKeg(ctx.db, { state: 'needs_cleaning' })).id;
  const clean = await createKeg(ctx.db);
  await setEquipmentState(ctx.db, clean.id, 'needs_cleaning', { at: t(-3), reason: 'Returned' });
  await createSanitationCycle(ctx.db, { equipmentId: clean.id, readyAt: t(-1) });
  made.clean = clean.id;
  const lapsed = await createKeg(ctx.db);
  await createSanitationCycle(ctx.db, { equipmentId: lapsed.id, readyAt: t(-30) });
  made.lapsed = lapsed.id;
  const stale = await createFermenter(ctx.db);
  await setEquipmentState(ctx.db, stale.id, 'needs_cleaning', { at: t(-4), reason: 'Emptied by transfer' });
  await createSanitationCycle(ctx.db, { equipmentId: stale.id, readyAt: t(-2) });
  await ctx.db.updateTable('equipment').set({ state: 'cleaned' }).where('id', '=', stale.id).execute();
  made.staleState = stale.id;

  // Three hand-overs within a day: one vessel ready, two not.
  for (const [i, id] of [made.clean, made.dirty, made.lapsed].entries()) {
    made.handovers.push(
      (await createBooking(ctx.db, { ownerId: member, equipmentId: id, startsAt: new Date(t(0).getTime() + (2 + i * 5) * HOUR), endsAt: t(3 + i), now: t(0) }))
        .id,
    );
  }

  // Eight readings falling steadily, a day apart, the last an hour ago; and the same curve stopped a month ago.
  const falling = (endDaysAgo: number) =>
    [1.052, 1.048, 1.044, 1.04, 1.036, 1.032, 1.028, 1.024].map((value, i) => ({ takenAt: new Date(t(-endDaysAgo - 7 + i).getTime() - HOUR), value }));
  made.steady = (await createBatch(ctx.db, { ownerId: member, name: 'Steady ale', status: 'fermenting', readings: falling(0) })).id;
  made.stopped = (await createBatch(ctx.db, { ownerId: member, name: 'Forgotten ale', status: 'fermenting', readings: falling(30) })).id;
});

describe('Today: counts equal their lists', () => {
  it('lists every hand-over of the next 24 hours, each with its vessel ready or not', async () => {
    const brewer = await ctx.signIn('brewer@example.org');
    const res = await brewer.get('/api/today');
    expect(res.status).toBe(200);
    const handovers = res.body.cellar.handovers as { bookingId: string; equipmentId: string; ready: boolean }[];
    expect(handovers.map((h) => h.bookingId)).toEqual(made.handovers);
    expect(Object.fromEntries(handovers.map((h) => [h.equipmentId, h.ready]))).toEqual({ [made.clean]: true, [made.dirty]: false, [made.lapsed]: false });
  });

  it('lists the vessels to clean by the state they have now, never one clean and sanitized since its last use', async () => {
    const brewer = await ctx.signIn('brewer@example.org');
    const { needsCleaning } = (await brewer.get('/api/today')).body.cellar as { needsCleaning: { total: number; items: { id: string; state: string }[] } };
    const ids = needsCleaning.items.map((v) => v.id);
    expect(ids).toContain(made.dirty);
    expect(ids).toContain(made.lapsed);
    expect(needsCleaning.items.find((v) => v.id === made.lapsed)?.state).toBe('needs_cleaning');
    expect(ids).not.toContain(made.clean);
    expect(ids).not.toContain(made.staleState);
    // The list shows the first ten ("and n more" on screen); the count is of the same vessels.
    expect(needsCleaning.items.length).toBe(Math.min(needsCleaning.total, 10));
    // The count of the cellar's own list agrees.
    const list = await brewer.get('/api/equipment?state=needs_cleaning');
    for (const id of [made.dirty, made.lapsed]) expect(list.body.items.map((e: { id: string }) => e.id)).toContain(id);
  });
});

describe('forecasts', () => {
  it('forecast eight steadily falling readings, dated after now', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.get(`/api/batches/${made.steady}`);
    expect(res.status).toBe(200);
    expect(res.body.forecast).not.toBeNull();
    expect(res.body.forecast.model).toBe('linear-trend');
    expect(Date.parse(res.body.forecast.readyAt)).toBeGreaterThan(ctx.clock.now().getTime());
    expect(res.body.forecast.predictedFg).toBeGreaterThan(1.005);
    expect(res.body.forecast.predictedFg).toBeLessThan(1.024);
  });

  it('never date a forecast in the past: readings that stopped long ago forecast nothing', async () => {
    const member = await ctx.signIn('member@example.org');
    expect((await member.get(`/api/batches/${made.stopped}`)).body.forecast).toBeNull();
  });

  it('drop a forecast once its date has passed', async () => {
    const member = await ctx.signIn('member@example.org');
    const before = (await member.get(`/api/batches/${made.steady}`)).body.forecast as { readyAt: string };
    ctx.clock.set(new Date(Date.parse(before.readyAt) + HOUR));
    const after = (await member.get(`/api/batches/${made.steady}`)).body.forecast as { readyAt: string } | null;
    if (after) expect(Date.parse(after.readyAt)).toBeGreaterThan(ctx.clock.now().getTime());
    expect(after).toBeNull();
  });
});
