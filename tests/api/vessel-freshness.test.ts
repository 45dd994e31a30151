import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKeg, createSanitationCycle, HOUR } from '../../db/factories/index.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => ctx?.close());

describe('a lapsed freshness window', () => {
  it('shows a ready vessel as needs_cleaning in the registry at once, before the periodic pass writes it down', async () => {
    // A keg made ready by a complete cycle an hour ago.
    const keg = await createKeg(ctx.db);
    const cycle = await createSanitationCycle(ctx.db, { equipmentId: keg.id, readyAt: new Date(ctx.clock.now().getTime() - HOUR) });
    expect(cycle.complete).toBe(true);
    const brewer = await ctx.signIn('brewer@example.org');
    const before = await brewer.get(`/api/equipment/${keg.id}`);
    expect(before.body.equipment.state).toBe('ready');

    // Every cycle of that keg went stale an hour ago (as if the window had run out).
    await ctx.db
      .updateTable('sanitation_cycle')
      .set({ fresh_until: new Date(ctx.clock.now().getTime() - HOUR) })
      .where('equipment_id', '=', keg.id)
      .where('complete', '=', true)
      .execute();

    const after = await brewer.get(`/api/equipment/${keg.id}`);
    expect(after.body.equipment.state).toBe('needs_cleaning');
    const list = await brewer.get(`/api/equipment?kind=keg&state=needs_cleaning&q=${keg.code}&pageSize=100`);
    expect(list.body.items.map((e: { code: string }) => e.code)).toContain(keg.code);
    const readyList = await brewer.get(`/api/equipment?kind=keg&state=ready&pageSize=100`);
    expect(readyList.body.items.map((e: { code: string }) => e.code)).not.toContain(keg.code);
    // The stored state is untouched until the pass runs; the API already answers with the truth.
    const stored = await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow();
    expect(stored.state).toBe('ready');
  });
});
