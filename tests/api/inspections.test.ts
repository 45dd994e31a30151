import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { createCo2Cylinder, createInspection, createKeg, createTap, DAY, setCylinderSupply } from '../../db/factories/index.ts';
import { batchPool, completeSteps, count, fullChecklist, kegPool, makeReady, states } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import { applyInspectionLapses } from '../../backend/modules/equipment/inspections.service.ts';

let ctx: TestContext;
let brewer: ApiClient, admin: ApiClient, member: ApiClient;
let takeKegs: ReturnType<typeof kegPool>;
let takeBatch: ReturnType<typeof batchPool>;

useTestContext(async (created) => {
  ctx = created;
  [brewer, admin, member] = await signInAs(ctx, 'brewer', 'admin', 'member');
  takeKegs = kegPool(ctx);
  takeBatch = batchPool(ctx);
});

const ago = (days: number) => new Date(ctx.clock.now().getTime() - days * DAY).toISOString();
const ahead = (days: number) => new Date(ctx.clock.now().getTime() + days * DAY).toISOString();
const dayOf = (iso: string) => iso.slice(0, 10);

/** A ready keg whose pressure test fell due yesterday (tested two years and a day ago). */
async function overdueKeg() {
  const [keg] = await takeKegs(1);
  await createInspection(ctx.db, { equipmentId: keg!.id, kind: 'pressure_test', at: ago(731), nextDueAt: ago(1) });
  await makeReady(brewer, [keg!.id], ctx.clock);
  return keg!;
}

function transferBody(batch: { batchId: string; fermenterId: string }, kegIds: string[], extra: Record<string, unknown> = {}) {
  return { batchId: batch.batchId, fromEquipmentId: batch.fermenterId, toKegIds: kegIds, volumeLiters: 19 * kegIds.length, checklist: fullChecklist, ...extra };
}

async function cylinderKg(id: string) {
  const res = await brewer.get(`/api/equipment/${id}`);
  expect(res.status).toBe(200);
  return res.body.cylinder.remainingKg as number;
}

describe('POST /api/equipment/:id/inspections and GET /api/equipment/:id', () => {
  it('records an inspection (201) and the item lists its inspections newest first with when each kind is due', async () => {
    const [keg] = await takeKegs(1);
    const due = ahead(700);
    const first = await brewer.post(`/api/equipment/${keg!.id}/inspections`, {
      kind: 'pressure_test',
      at: ago(30),
      passed: true,
      nextDueAt: due,
      note: 'Held 60 psi for 10 minutes',
    });
    expect(first.status).toBe(201);
    expect(first.body.inspection).toMatchObject({
      kind: 'pressure_test',
      passed: true,
      nextDueAt: due,
      note: 'Held 60 psi for 10 minutes',
      recordedBy: { id: brewer.user.id },
    });
    // No next date given: the co-op's interval for the kind (relief valves: 12 months, Settings "Pressure vessels and gas").
    const second = await admin.post(`/api/equipment/${keg!.id}/inspections`, { kind: 'relief_valve', at: '2026-11-20T10:00:00Z', passed: true });
    expect(second.status).toBe(201);
    expect(second.body.inspection.nextDueAt).toBe('2027-11-20T10:00:00.000Z');

    const res = await member.get(`/api/equipment/${keg!.id}`);
    expect(res.status).toBe(200);
    expect(res.body.inspections.map((i: { kind: string }) => i.kind)).toEqual(['relief_valve', 'pressure_test']);
    expect(res.body.inspectionsDue).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ kind: 'pressure_test', dueAt: due }),
        expect.objectContaining({ kind: 'relief_valve', dueAt: '2027-11-20T10:00:00.000Z' }),
      ]),
    );
    expect(res.body.inspectionsDue).toHaveLength(2);
  });

  it('refuses what does not fit (422) and those not on the rota (403), changing nothing', async () => {
    const [keg] = await takeKegs(1);
    const tap = await createTap(ctx.db);
    const before = await count(ctx, 'equipment_inspection');
    const cases: [ApiClient, string, object, number][] = [
      [brewer, tap.id, { kind: 'pressure_test', at: ago(1), passed: true }, 422],
      [brewer, keg!.id, { kind: 'hydrostatic_test', at: ago(1), passed: true }, 422],
      [brewer, keg!.id, { kind: 'pressure_test', at: ahead(2), passed: true }, 422],
      [brewer, keg!.id, { kind: 'pressure_test', at: ago(1), passed: true, nextDueAt: ago(2) }, 422],
      [brewer, keg!.id, { kind: 'leak_check', at: ago(1), passed: true }, 422],
      [member, keg!.id, { kind: 'pressure_test', at: ago(1), passed: true }, 403],
    ];
    for (const [client, id, body, status] of cases) {
      const res = await client.post(`/api/equipment/${id}/inspections`, body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
    const after = await count(ctx, 'equipment_inspection');
    expect(after).toBe(before);
  });
});

describe('an item past an inspection, or failing one, is not filled or carbonated', () => {
  it('refuses a transfer into a keg past its pressure test (409, nothing changes) until a passing test is recorded', async () => {
    const batch = await takeBatch();
    const keg = await overdueKeg();
    const [fresh] = await takeKegs(1);
    await makeReady(brewer, [fresh!.id], ctx.clock);
    const before = {
      transfers: await count(ctx, 'transfer'),
      fills: await count(ctx, 'keg_fill'),
      states: await states(ctx, [keg.id, fresh!.id, batch.fermenterId]),
    };

    const refused = await brewer.post('/api/transfers', transferBody(batch, [fresh!.id, keg.id]));
    expect(refused.status).toBe(409);
    expect(refused.body.detail).toContain(`${keg.code} (pressure test was due ${dayOf(ago(1))})`);
    expect(refused.body.blocked).toEqual([
      expect.objectContaining({ equipmentId: keg.id, inspections: [expect.objectContaining({ kind: 'pressure_test', reason: 'overdue' })] }),
    ]);
    expect(await count(ctx, 'transfer')).toBe(before.transfers);
    expect(await count(ctx, 'keg_fill')).toBe(before.fills);
    expect(await states(ctx, [keg.id, fresh!.id, batch.fermenterId])).toEqual(before.states);
    const b = await ctx.db.selectFrom('batch').select('status').where('id', '=', batch.batchId).executeTakeFirstOrThrow();
    expect(b.status).not.toBe('packaged');

    const passed = await brewer.post(`/api/equipment/${keg.id}/inspections`, { kind: 'pressure_test', at: ago(0.01), passed: true });
    expect(passed.status).toBe(201);
    expect(passed.body.inspectionsDue).toEqual([expect.objectContaining({ kind: 'pressure_test', overdue: false, failed: false })]);
    const ok = await brewer.post('/api/transfers', transferBody(batch, [fresh!.id, keg.id]));
    expect(ok.status).toBe(201);
  });

  it('a failed relief-valve check takes the keg out of service with history; a passing one puts it back to be cleaned', async () => {
    const [keg] = await takeKegs(1);
    await makeReady(brewer, [keg!.id], ctx.clock);
    const failed = await brewer.post(`/api/equipment/${keg!.id}/inspections`, { kind: 'relief_valve', at: ago(0.01), passed: false, note: 'Valve stuck shut' });
    expect(failed.status).toBe(201);
    expect(failed.body.inspection.nextDueAt).toBeNull();
    expect(failed.body.equipment.state).toBe('out_of_service');
    const page = await brewer.get(`/api/equipment/${keg!.id}`);
    expect(page.body.history[0]).toMatchObject({
      fromState: 'ready',
      toState: 'out_of_service',
      reason: 'Inspection failed: relief-valve check (Valve stuck shut)',
    });
    expect(page.body.inspectionsDue).toEqual([expect.objectContaining({ kind: 'relief_valve', failed: true })]);

    const batch = await takeBatch();
    const refused = await brewer.post('/api/transfers', transferBody(batch, [keg!.id]));
    expect(refused.status).toBe(409);
    expect(refused.body.detail).toContain('relief-valve check failed');

    const passed = await brewer.post(`/api/equipment/${keg!.id}/inspections`, { kind: 'relief_valve', at: ago(0.005), passed: true, note: 'New valve' });
    expect(passed.status).toBe(201);
    expect(passed.body.equipment.state).toBe('needs_cleaning');
    const after = await brewer.get(`/api/equipment/${keg!.id}`);
    expect(after.body.history[0]).toMatchObject({
      fromState: 'out_of_service',
      toState: 'needs_cleaning',
      reason: 'Back in service: relief-valve check passed',
    });
    await makeReady(brewer, [keg!.id], ctx.clock);
    expect((await brewer.post('/api/transfers', transferBody(batch, [keg!.id]))).status).toBe(201);
  });

  it('refuses a carbonation plan for a keg whose seals are past due (409, no plan) until they are done', async () => {
    const batch = await takeBatch();
    const [keg] = await takeKegs(1);
    await makeReady(brewer, [keg!.id], ctx.clock);
    expect((await brewer.post('/api/transfers', transferBody(batch, [keg!.id]))).status).toBe(201);
    // The seals fell due after the keg was filled.
    await createInspection(ctx.db, { equipmentId: keg!.id, kind: 'seals', at: ago(366), nextDueAt: ago(0.5) });
    const plans = await count(ctx, 'carbonation_plan');
    const refused = await brewer.post('/api/carbonation-plans', { kegId: keg!.id, targetVolumes: 2.4, method: 'set_and_hold' });
    expect(refused.status).toBe(409);
    expect(refused.body.detail).toMatch(/Cannot be carbonated: K-\d+ \(o-rings and seals replaced was due/);
    expect(await count(ctx, 'carbonation_plan')).toBe(plans);
    expect((await brewer.post(`/api/equipment/${keg!.id}/inspections`, { kind: 'seals', at: ago(0.01), passed: true })).status).toBe(201);
    expect((await brewer.post('/api/carbonation-plans', { kegId: keg!.id, targetVolumes: 2.4, method: 'set_and_hold' })).status).toBe(201);
  });

  it('the periodic pass takes an idle keg whose test has come due out of service with history, leaves a full one be, and a passing test puts it back', async () => {
    const [idle, full] = await takeKegs(2);
    await makeReady(brewer, [idle!.id, full!.id], ctx.clock);
    const batch = await takeBatch();
    expect((await brewer.post('/api/transfers', transferBody(batch, [full!.id]))).status).toBe(201);
    await createInspection(ctx.db, { equipmentId: idle!.id, kind: 'pressure_test', at: ago(800), nextDueAt: ago(0.2) });
    await createInspection(ctx.db, { equipmentId: full!.id, kind: 'pressure_test', at: ago(800), nextDueAt: ago(0.2) });

    expect(await applyInspectionLapses(ctx.db, ctx.clock.now())).toBeGreaterThanOrEqual(1);
    const page = await brewer.get(`/api/equipment/${idle!.id}`);
    expect(page.body.equipment.state).toBe('out_of_service');
    expect(page.body.history[0]).toMatchObject({
      fromState: 'ready',
      toState: 'out_of_service',
      reason: `Inspection past due: pressure test was due ${dayOf(ago(0.2))}`,
    });
    // A keg holding beer keeps its state; the refusals still stop it being carbonated.
    expect((await brewer.get(`/api/equipment/${full!.id}`)).body.equipment.state).toBe('holding');
    // A second pass writes nothing more.
    const historyRows = async () =>
      (
        await ctx.db
          .selectFrom('equipment_state_change')
          .select((eb) => eb.fn.countAll<string>().as('n'))
          .executeTakeFirstOrThrow()
      ).n;
    const rows = await historyRows();
    expect(await applyInspectionLapses(ctx.db, ctx.clock.now())).toBe(0);
    expect(await historyRows()).toBe(rows);

    const passed = await brewer.post(`/api/equipment/${idle!.id}/inspections`, { kind: 'pressure_test', at: ago(0.01), passed: true });
    expect(passed.status).toBe(201);
    expect(passed.body.equipment.state).toBe('needs_cleaning');
    expect((await brewer.get(`/api/equipment/${idle!.id}`)).body.history[0]).toMatchObject({
      toState: 'needs_cleaning',
      reason: 'Back in service: pressure test passed',
    });
  });
});

describe('the planner and the keg’s rated working pressure', () => {
  it('refuses (422) a fast start above the keg’s rating, in the preview and the plan, and shows the rating', async () => {
    const batch = await takeBatch();
    const keg = await createKeg(ctx.db, { attributes: { ratedPressureKpa: 200 } });
    await makeReady(brewer, [keg.id], ctx.clock);
    expect((await brewer.post('/api/transfers', transferBody(batch, [keg.id]))).status).toBe(201);
    const plans = await count(ctx, 'carbonation_plan');

    const preview = await brewer.post('/api/carbonation-plans/preview', { kegId: keg.id, targetVolumes: 2.4, method: 'fast_start', fastStartPressureKpa: 207 });
    expect(preview.status).toBe(422);
    expect(preview.body.detail).toContain("above the keg's rated working pressure of 200 kPa (29 psi)");
    expect(preview.body.errors).toEqual([{ path: 'fastStartPressureKpa', message: "Above the keg's rating of 200 kPa" }]);
    const plan = await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.4, method: 'fast_start', fastStartPressureKpa: 207 });
    expect(plan.status).toBe(422);
    expect(await count(ctx, 'carbonation_plan')).toBe(plans);

    const fine = await brewer.post('/api/carbonation-plans/preview', { kegId: keg.id, targetVolumes: 2.4, method: 'fast_start', fastStartPressureKpa: 180 });
    expect(fine.status).toBe(200);
    expect(fine.body.plan.kegRatedPressureKpa).toBe(200);
    expect((await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.4, method: 'set_and_hold' })).status).toBe(201);
  });
});

describe('CO2 cylinders: contents, the gas line and test dates', () => {
  it('takes the CO2 of keg fills and purges off the connected cylinder, logs swaps, and never goes below zero', async () => {
    const c1 = await createCo2Cylinder(ctx.db, { attributes: { sizeKg: 10, fillPercent: 90, hydroTestDue: dayOf(ahead(900)) } });
    const c2 = await createCo2Cylinder(ctx.db, { attributes: { sizeKg: 6, fillPercent: 100, hydroTestDue: dayOf(ahead(900)) } });
    expect(await cylinderKg(c1.id)).toBe(9);
    const connect = await brewer.post(`/api/equipment/${c1.id}/connect`, { note: 'On the cold-room manifold' });
    expect(connect.status).toBe(200);
    expect(connect.body.cylinder).toMatchObject({ connected: true, remainingKg: 9 });

    // Two kegs with 80 g recorded for the fill: 40 g each off the cylinder.
    const batch = await takeBatch();
    const kegs = await takeKegs(2);
    await makeReady(
      brewer,
      kegs.map((k) => k.id),
      ctx.clock,
    ); // two purges at the co-op's 15 g
    expect(await cylinderKg(c1.id)).toBe(8.97);
    expect(
      (
        await brewer.post(
          '/api/transfers',
          transferBody(
            batch,
            kegs.map((k) => k.id),
            { co2Grams: 80 },
          ),
        )
      ).status,
    ).toBe(201);
    const page = await brewer.get(`/api/equipment/${c1.id}`);
    expect(page.body.cylinder.remainingKg).toBe(8.89);
    expect(page.body.equipment.attributes.fillPercent).toBe(88.9);
    expect(page.body.cylinder.log.slice(0, 2).map((e: { action: string; kg: number }) => [e.action, e.kg])).toEqual([
      ['drawn', 0.04],
      ['drawn', 0.04],
    ]);

    // A swap: C2 on the line in place of C1, logged on both.
    expect((await brewer.post(`/api/equipment/${c2.id}/connect`, {})).status).toBe(200);
    const c2Page = await brewer.get(`/api/equipment/${c2.id}`);
    expect(c2Page.body.cylinder.log[0]).toMatchObject({ action: 'connected', replacedCylinder: { id: c1.id } });
    const c1After = (await brewer.get(`/api/equipment/${c1.id}`)).body.cylinder;
    expect(c1After.connected).toBe(false);
    expect(c1After.log[0]).toMatchObject({ action: 'disconnected', remainingKg: 8.89 });

    // Almost empty: a fill that needs more than is left is refused and records nothing.
    await setCylinderSupply(ctx.db, { cylinderId: c2.id, remainingKg: 0.03, connected: true, at: ago(0.1) });
    const batch2 = await takeBatch();
    const [keg] = await takeKegs(1);
    await makeReady(brewer, [keg!.id], ctx.clock);
    expect(await cylinderKg(c2.id)).toBe(0.015);
    const fills = await count(ctx, 'keg_fill');
    const refused = await brewer.post('/api/transfers', transferBody(batch2, [keg!.id], { co2Grams: 40 }));
    expect(refused.status).toBe(409);
    expect(refused.body.detail).toContain('has 0.015 kg left');
    expect(await count(ctx, 'keg_fill')).toBe(fills);
    expect(await cylinderKg(c2.id)).toBe(0.015);
    // The database's guarantee.
    await expect(sql`update co2_cylinder_supply set remaining_kg = -0.001 where cylinder_id = ${c2.id}`.execute(ctx.db)).rejects.toThrow(/check constraint/);

    // Refilled: back to its size, and the fill goes through.
    expect((await brewer.post(`/api/equipment/${c2.id}/refill`, {})).body.cylinder.remainingKg).toBe(6);
    expect((await brewer.post('/api/transfers', transferBody(batch2, [keg!.id], { co2Grams: 40 }))).status).toBe(201);
    expect(await cylinderKg(c2.id)).toBe(5.96);
    await ctx.db.updateTable('co2_cylinder_supply').set({ connected: false }).execute();
  });

  it('a cylinder past its test date cannot be connected or booked (409) until a passing hydrostatic test moves the date', async () => {
    const old = await createCo2Cylinder(ctx.db, { attributes: { sizeKg: 6, fillPercent: 100, hydroTestDue: dayOf(ago(3)) } });
    const page = await brewer.get(`/api/equipment/${old.id}`);
    expect(page.body.inspectionsDue).toEqual([expect.objectContaining({ kind: 'hydrostatic_test', overdue: true })]);

    const connect = await brewer.post(`/api/equipment/${old.id}/connect`, {});
    expect(connect.status).toBe(409);
    expect(connect.body.detail).toContain(`hydrostatic test was due ${dayOf(ago(2))}`);
    const booking = await member.post('/api/bookings', { equipmentId: old.id, startsAt: ahead(2), endsAt: ahead(4) });
    expect(booking.status).toBe(409);
    expect(await ctx.db.selectFrom('co2_cylinder_supply').select('cylinder_id').where('cylinder_id', '=', old.id).executeTakeFirst()).toBeUndefined();

    const test = await brewer.post(`/api/equipment/${old.id}/inspections`, {
      kind: 'hydrostatic_test',
      at: ago(0.01),
      passed: true,
      nextDueAt: '2031-12-01T00:00:00Z',
    });
    expect(test.status).toBe(201);
    expect(test.body.equipment.attributes.hydroTestDue).toBe('2031-11-30');
    expect((await brewer.post(`/api/equipment/${old.id}/connect`, {})).status).toBe(200);
    expect((await member.post('/api/bookings', { equipmentId: old.id, startsAt: ahead(2), endsAt: ahead(4) })).status).toBe(201);
  });

  it('refuses a fill while the connected cylinder is past its test date, recording nothing', async () => {
    const cyl = await createCo2Cylinder(ctx.db, { attributes: { sizeKg: 6, fillPercent: 100, hydroTestDue: dayOf(ago(1)) } });
    await setCylinderSupply(ctx.db, { cylinderId: cyl.id, remainingKg: 6, connected: true, at: ago(30) });
    const batch = await takeBatch();
    const [keg] = await takeKegs(1);
    await createInspection(ctx.db, { equipmentId: keg!.id, kind: 'pressure_test', at: ago(10) });
    const cycles = await count(ctx, 'sanitation_cycle');
    const purge = await brewer.post('/api/sanitation-cycles', { equipmentId: keg!.id, steps: completeSteps(ctx.clock) });
    expect(purge.status).toBe(409);
    expect(purge.body.detail).toContain('connect another cylinder');
    expect(await count(ctx, 'sanitation_cycle')).toBe(cycles);
    await ctx.db.updateTable('co2_cylinder_supply').set({ connected: false }).execute();
    await makeReady(brewer, [keg!.id], ctx.clock);
    expect((await brewer.post('/api/transfers', transferBody(batch, [keg!.id]))).status).toBe(201);
  });
});

describe('maintenance list and Today', () => {
  it('lists failed, past-due and soon-due inspections, sorted, filtered and paged in the server', async () => {
    const overdue = await createKeg(ctx.db, { code: 'K-7701' });
    const failed = await createKeg(ctx.db, { code: 'K-7702' });
    const soon = await createKeg(ctx.db, { code: 'K-7703' });
    const later = await createKeg(ctx.db, { code: 'K-7704' });
    await createInspection(ctx.db, { equipmentId: overdue.id, kind: 'pressure_test', at: ago(800), nextDueAt: ago(70) });
    await createInspection(ctx.db, { equipmentId: failed.id, kind: 'relief_valve', at: ago(2), passed: false });
    await createInspection(ctx.db, { equipmentId: soon.id, kind: 'seals', at: ago(350), nextDueAt: ahead(10) });
    await createInspection(ctx.db, { equipmentId: later.id, kind: 'seals', at: ago(10), nextDueAt: ahead(300) });

    const all = await brewer.get('/api/equipment/maintenance?q=K-77&sort=dueAt&order=asc');
    expect(all.status).toBe(200);
    expect(all.body.items.map((i: { equipment: { code: string }; status: string }) => [i.equipment.code, i.status])).toEqual([
      ['K-7702', 'failed'],
      ['K-7701', 'overdue'],
      ['K-7703', 'due_soon'],
    ]);
    expect(all.body.total).toBe(3);
    const paged = await brewer.get('/api/equipment/maintenance?q=K-77&sort=code&order=desc&pageSize=2&page=2');
    expect(paged.body).toMatchObject({
      total: 3,
      page: 2,
      pageSize: 2,
      items: [expect.objectContaining({ equipment: expect.objectContaining({ code: 'K-7701' }) })],
    });
    const onlyOverdue = await brewer.get('/api/equipment/maintenance?q=K-77&status=overdue');
    expect(onlyOverdue.body.items.map((i: { equipment: { code: string } }) => i.equipment.code)).toEqual(['K-7701']);
    expect((await brewer.get('/api/equipment/maintenance?sort=nope')).status).toBe(422);

    const today = await brewer.get('/api/today');
    expect(today.body.cellar.inspectionsDue.items).toEqual(
      expect.arrayContaining([expect.objectContaining({ equipment: expect.objectContaining({ id: overdue.id }), kind: 'pressure_test', status: 'overdue' })]),
    );
    expect((await member.get('/api/today')).body.cellar).toBeUndefined();
  });
});
