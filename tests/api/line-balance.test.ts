import { describe, expect, it } from 'vitest';
import { createTap } from '../../db/factories/index.ts';
import { batchPool, fillNewKegs, kegPool } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

let ctx: TestContext;
let admin: ApiClient, brewer: ApiClient, member: ApiClient;
let takeKegs: ReturnType<typeof kegPool>;
let takeBatch: ReturnType<typeof batchPool>;

useTestContext(async (created) => {
  ctx = created;
  [admin, brewer, member] = await signInAs(ctx, 'admin', 'brewer', 'member');
  takeKegs = kegPool(ctx);
  takeBatch = batchPool(ctx);
});

/** psi per foot in kPa per metre. */
const psiPerFt = (v: number) => (v * 6.894757293168361) / 0.3048;
const houseAle = { targetVolumes: 2.4, temperatureC: 3, altitudeM: 0, method: 'set_and_hold' };

async function tapRecord(id: string) {
  const res = await admin.get(`/api/equipment/${id}`);
  expect(res.status).toBe(200);
  return res.body.equipment as { attributes: Record<string, unknown>; updatedAt?: string };
}

describe('the line of a tap', () => {
  it('balances the common line (3/16" vinyl, 0.6 m rise) at about 1.75 m for the house ale, so 1.8 m suits', async () => {
    const tap = await createTap(ctx.db, {
      attributes: { position: 'Cold room, test board, 1', lineLengthM: 1.8, lineInsideDiameterMm: 4.8, riseM: 0.6, coldRoomTempC: 3 },
    });
    const res = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, tapId: tap.id });
    expect(res.status).toBe(200);
    expect(res.body.plan.line).toMatchObject({ tapId: tap.id, tubing: 'vinyl-3/16', suits: true });
    expect(res.body.plan.line.resistanceKpaPerM).toBeCloseTo(psiPerFt(1.375), 6); // [CP] REFERENCE §8: ~8 ft at 12 psi
    expect(res.body.plan.line.balancedLengthM).toBeCloseTo(1.75, 1);
    expect(res.body.plan.line.verdict).not.toMatch(/too long/);
  });

  it('lets the admin set the line material and the measured resistance per tap, and the planner uses them', async () => {
    const tap = await createTap(ctx.db, {
      attributes: { position: 'Cold room, test board, 2', lineLengthM: 1.5, lineInsideDiameterMm: 4.76, riseM: 0, coldRoomTempC: 3 },
    });
    const set = await admin.patch(`/api/equipment/${tap.id}`, { attributes: { lineMaterial: 'polyethylene' } });
    expect(set.status).toBe(200);
    expect(set.body.equipment.attributes).toMatchObject({ lineMaterial: 'polyethylene', lineLengthM: 1.5, lineInsideDiameterMm: 4.76 });
    const poly = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, tapId: tap.id });
    expect(poly.body.plan.line).toMatchObject({ tubing: 'polyethylene-3/16', material: 'polyethylene' });
    expect(poly.body.plan.line.resistanceKpaPerM).toBeCloseTo(psiPerFt(2.2), 6); // [P2] S30, S33

    const measured = await admin.patch(`/api/equipment/${tap.id}`, { attributes: { lineResistanceKpaPerM: 40 } });
    expect(measured.status).toBe(200);
    const own = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, tapId: tap.id });
    expect(own.body.plan.line.resistanceKpaPerM).toBe(40);

    // null clears the tap's own figure: back to the line type's default.
    expect((await admin.patch(`/api/equipment/${tap.id}`, { attributes: { lineResistanceKpaPerM: null } })).status).toBe(200);
    const back = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, tapId: tap.id });
    expect(back.body.plan.line.resistanceKpaPerM).toBeCloseTo(psiPerFt(2.2), 6);

    // The tap board shows the tap's line as recorded.
    const board = await brewer.get('/api/kegs/tap-board');
    const entry = (board.body.taps as { id: string; lineMaterial: string | null; lineResistanceKpaPerM: number | null }[]).find((t) => t.id === tap.id);
    expect(entry).toMatchObject({ lineMaterial: 'polyethylene', lineResistanceKpaPerM: null });
  });

  it('refuses an unknown material or an impossible resistance and changes nothing; only the admin may set them', async () => {
    const tap = await createTap(ctx.db, {
      attributes: { position: 'Cold room, test board, 3', lineLengthM: 1.8, lineInsideDiameterMm: 4.8, riseM: 0.6, coldRoomTempC: 3 },
    });
    const before = await tapRecord(tap.id);
    for (const attributes of [{ lineMaterial: 'copper' }, { lineResistanceKpaPerM: 0 }, { lineResistanceKpaPerM: 500 }, { lineResistanceKpaPerM: 'high' }]) {
      const res = await admin.patch(`/api/equipment/${tap.id}`, { attributes });
      expect(res.status).toBe(422);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
    for (const api of [brewer, member]) {
      expect((await api.patch(`/api/equipment/${tap.id}`, { attributes: { lineMaterial: 'barrier' } })).status).toBe(403);
    }
    expect(await tapRecord(tap.id)).toEqual(before);
  });
});

describe('the line checked in the planner', () => {
  it('takes another line type and resistance for a tap, and the saved plan remembers the material', async () => {
    const tap = await createTap(ctx.db, {
      attributes: { position: 'Cold room, test board, 4', lineLengthM: 1.8, lineInsideDiameterMm: 4.8, riseM: 0.6, coldRoomTempC: 3 },
    });
    const line = { lengthM: 1.8, insideDiameterMm: 4.76, riseM: 0.6, material: 'barrier', resistanceKpaPerM: psiPerFt(2.2) };
    const preview = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, tapId: tap.id, line });
    expect(preview.status).toBe(200);
    expect(preview.body.plan.line).toMatchObject({ tapId: tap.id, tubing: 'barrier-3/16', material: 'barrier' });

    const {
      kegs: [keg],
    } = await fillNewKegs(ctx, brewer, await takeBatch(), 1);
    const saved = await brewer.post('/api/carbonation-plans', { kegId: keg!.id, ...houseAle, tapId: tap.id, line });
    expect(saved.status).toBe(201);
    const shown = await brewer.get(`/api/carbonation-plans/${saved.body.plan.id}`);
    expect(shown.body.plan.line).toMatchObject({ tapId: tap.id, material: 'barrier', tubing: 'barrier-3/16' });
    expect(shown.body.plan.line.resistanceKpaPerM).toBeCloseTo(psiPerFt(2.2), 2);
  });

  it('refuses an unknown material and a line given with something that is not a tap', async () => {
    const bad = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, line: { lengthM: 2, insideDiameterMm: 4.8, material: 'copper' } });
    expect(bad.status).toBe(422);
    const [keg] = await takeKegs(1);
    const notTap = await brewer.post('/api/carbonation-plans/preview', { ...houseAle, tapId: keg!.id, line: { lengthM: 2, insideDiameterMm: 4.8 } });
    expect(notTap.status).toBe(422);
    expect(notTap.body.errors[0].path).toBe('tapId');
  });
});
