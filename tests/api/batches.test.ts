import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  abv,
  apparentAttenuation,
  brixToSg,
  convertGravity,
  correctHydrometer,
  litersToUsBarrels,
  realAttenuation,
  refractometerFinalGravity,
} from '../../shared/brewing/index.ts';
import { createBatch, createBooking, createFermenter } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import { countReadings } from '../helpers/counts.ts';
import { binary } from '../helpers/http.ts';

let ctx: TestContext;
let member: ApiClient, member2: ApiClient, brewer: ApiClient, treasurer: ApiClient, admin: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  [member, member2, brewer, treasurer, admin] = await signInAs(ctx, 'member', 'member2', 'brewer', 'treasurer', 'admin');
});

const DAY = 86_400_000;
const at = (start: string, days: number) => new Date(Date.parse(start) + days * DAY).toISOString();

async function newBatch(client: ApiClient, body: Record<string, unknown> = {}) {
  const res = await client.post('/api/batches', { name: 'Test amber', style: 'Amber ale', volumeLiters: 23, targetOg: 1.052, targetFg: 1.012, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.batch as { id: string; status: string; ownerId: string };
}

describe('creating and changing batches', () => {
  it('lets a member create a planned batch of their own, with an audit row', async () => {
    const res = await member.post('/api/batches', { name: 'Autumn porter', style: 'Porter', volumeLiters: 28, targetOg: 1.058 });
    expect(res.status).toBe(201);
    expect(res.body.batch).toMatchObject({
      name: 'Autumn porter',
      style: 'Porter',
      volumeLiters: 28,
      targetOg: 1.058,
      targetFg: null,
      status: 'planned',
      ownerId: member.user.id,
      og: null,
      fg: null,
      abv: null,
      readingsCount: 0,
    });
    // Created at the app's clock, not the database server's.
    // (The test clock starts at TEST_NOW, on most days far from the machine's date, and moves on with the test.)
    expect(Math.abs(Date.parse(res.body.batch.createdAt) - ctx.clock.now().getTime())).toBeLessThan(60_000);
    const audit = await ctx.db
      .selectFrom('audit_log')
      .select(['action', 'actor_id'])
      .where('subject_type', '=', 'Batch')
      .where('subject_id', '=', res.body.batch.id)
      .execute();
    expect(audit).toEqual([{ action: 'created', actor_id: member.user.id }]);
  });

  it('rejects bad bodies with 422 and per-field errors', async () => {
    const res = await member.post('/api/batches', { name: '', volumeLiters: -3, targetOg: 1.5 });
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.body.errors.map((e: { path: string }) => e.path).sort()).toEqual(['name', 'targetOg', 'volumeLiters']);
    const targets = await member.post('/api/batches', { name: 'Upside down', volumeLiters: 20, targetOg: 1.04, targetFg: 1.05 });
    expect(targets.status).toBe(422);
    expect(targets.body.errors[0].path).toBe('targetFg');
  });

  it('keeps the brewer on duty and the treasurer from creating batches', async () => {
    expect((await brewer.post('/api/batches', { name: 'Nope', volumeLiters: 20 })).status).toBe(403);
    expect((await treasurer.post('/api/batches', { name: 'Nope', volumeLiters: 20 })).status).toBe(403);
  });

  it('moves through the statuses in order and refuses a jump back from packaged', async () => {
    const b = await newBatch(member);
    const bad = await member.patch(`/api/batches/${b.id}`, { status: 'conditioning' });
    expect(bad.status).toBe(409);
    expect((await member.patch(`/api/batches/${b.id}`, { status: 'fermenting', notes: 'Pitched at 18 °C' })).body.batch).toMatchObject({
      status: 'fermenting',
      notes: 'Pitched at 18 °C',
    });
    expect((await member.patch(`/api/batches/${b.id}`, { status: 'conditioning' })).body.batch.status).toBe('conditioning');
    const packaged = await member.patch(`/api/batches/${b.id}`, { status: 'packaged', packagedLiters: 21.5 });
    expect(packaged.status).toBe(200);
    expect(packaged.body.batch.packagedLiters).toBe(21.5);
    expect(packaged.body.batch.packagedAt).toBeTruthy();
    expect((await member.patch(`/api/batches/${b.id}`, { status: 'fermenting' })).status).toBe(409);
    expect((await member.patch(`/api/batches/${b.id}`, {})).status).toBe(422);
  });

  it('lets only the owner and the admin change a batch', async () => {
    const b = await newBatch(member);
    expect((await member2.patch(`/api/batches/${b.id}`, { name: 'Mine now' })).status).toBe(404);
    expect((await brewer.patch(`/api/batches/${b.id}`, { name: 'Mine now' })).status).toBe(403);
    expect((await treasurer.patch(`/api/batches/${b.id}`, { name: 'Mine now' })).status).toBe(403);
    expect((await admin.patch(`/api/batches/${b.id}`, { name: 'Renamed by the manager' })).body.batch.name).toBe('Renamed by the manager');
  });

  it('links the owner’s fermenter booking and refuses someone else’s, or one holding another batch', async () => {
    // The member's batch in a fermenter they booked (the booking holds it), and another member's fermenter booking.
    const now = ctx.clock.now().getTime();
    const fermenter = await createFermenter(ctx.db, { capacityLiters: 60 });
    const inIt = await createBatch(ctx.db, {
      ownerId: member.user.id,
      name: 'First tenant',
      readings: [{ takenAt: new Date(now - 4 * DAY), value: 1.05 }],
      fermenter: { equipmentId: fermenter.id, startsAt: new Date(now - 5 * DAY), endsAt: new Date(now + 9 * DAY), now: new Date(now) },
    });
    const own = { id: inIt.bookingId!, code: fermenter.code, batch_id: inIt.id };
    const others = await createBooking(ctx.db, {
      ownerId: member2.user.id,
      equipmentId: (await createFermenter(ctx.db)).id,
      startsAt: new Date(now + DAY),
      endsAt: new Date(now + 15 * DAY),
      now: new Date(now),
    });
    const taken = await member.post('/api/batches', { name: 'Second tenant', volumeLiters: 20, bookingId: own.id });
    expect(taken.status).toBe(409);
    await ctx.db.updateTable('booking').set({ batch_id: null }).where('id', '=', own.id).execute();
    const b = await newBatch(member, { bookingId: own.id });
    const detail = await member.get(`/api/batches/${b.id}`);
    expect(detail.body.bookings).toEqual([expect.objectContaining({ id: own.id, equipmentCode: own.code })]);
    const res = await member.patch(`/api/batches/${b.id}`, { bookingId: others.id });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].path).toBe('bookingId');
    const unlinked = await member.patch(`/api/batches/${b.id}`, { bookingId: null });
    expect(unlinked.body.batch.bookings).toEqual([]);
  });
});

describe('readings and what they say', () => {
  it('computes og, fg, abv and attenuations from the readings with the brewing maths', async () => {
    const b = await newBatch(member, { targetFg: 1.01 });
    const start = '2026-10-01T08:00:00.000Z';
    // A fermentation levelling off at 1.010: readings to 0.001, stable over the last three days.
    const series = [1.05, 1.041, 1.029, 1.02, 1.015, 1.012, 1.011, 1.01, 1.01, 1.01, 1.01];
    for (const [i, sg] of series.entries()) {
      const r = await member.post(`/api/batches/${b.id}/readings`, { takenAt: at(start, i), gravity: sg, unit: 'sg' });
      expect(r.status, JSON.stringify(r.body)).toBe(201);
    }
    const res = await member.get(`/api/batches/${b.id}`);
    expect(res.status).toBe(200);
    const d = res.body;
    expect(d.batch.id).toBe(b.id);
    expect(d.status).toBe('fermenting'); // the first reading started it
    expect(d.og).toBe(1.05);
    expect(d.currentGravity).toBe(1.01);
    expect(d.fg).toBe(1.01);
    expect(d.figuresFrom).toBe('fg');
    expect(d.stable).toMatchObject({ stable: true, toleranceSg: 0.001, spanDays: 3, since: at(start, 6) });
    expect(d.abv).toBeCloseTo(abv(1.05, 1.01), 3);
    expect(d.apparentAttenuation).toBeCloseTo(apparentAttenuation(1.05, 1.01), 3);
    expect(d.realAttenuation).toBeCloseTo(realAttenuation(1.05, 1.01), 3);
    expect(d.abv).toBeGreaterThan(5.1);
    expect(d.abv).toBeLessThan(5.5);
    expect(d.series).toHaveLength(series.length);
    // The curve levelled off in October, before the test's now: a forecast would be dated in the past, so there is none.
    expect(d.forecast).toBeNull();
    expect(d.readingsCount).toBe(series.length);
  });

  it('gives no FG before the gravity is stable, and figures "so far" from the current gravity', async () => {
    const b = await newBatch(member);
    await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-10T08:00:00Z', gravity: 1.048, unit: 'sg' });
    await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-12T08:00:00Z', gravity: 1.03, unit: 'sg' });
    const d = (await member.get(`/api/batches/${b.id}`)).body;
    expect(d.fg).toBeNull();
    expect(d.stable.stable).toBe(false);
    expect(d.figuresFrom).toBe('current');
    expect(d.abv).toBeCloseTo(abv(1.048, 1.03), 3);
  });

  it('corrects a hydrometer reading for temperature and keeps what was entered', async () => {
    const b = await newBatch(member);
    const res = await member.post(`/api/batches/${b.id}/readings`, {
      takenAt: '2026-10-01T09:00:00+02:00',
      gravity: 1.05,
      unit: 'sg',
      temperatureC: 30,
      note: 'warm sample',
    });
    expect(res.status).toBe(201);
    expect(res.body.reading).toMatchObject({
      takenAt: '2026-10-01T07:00:00.000Z',
      enteredValue: 1.05,
      enteredUnit: 'sg',
      temperatureC: 30,
      corrected: true,
      rawSg: 1.05,
      source: 'manual',
      note: 'warm sample',
    });
    expect(res.body.reading.gravitySg).toBeCloseTo(correctHydrometer(1.05, 30), 4);
    const raw = await member.post(`/api/batches/${b.id}/readings`, {
      takenAt: '2026-10-02T09:00:00Z',
      gravity: 1.04,
      unit: 'sg',
      temperatureC: 30,
      correctTemperature: false,
    });
    expect(raw.body.reading).toMatchObject({ gravitySg: 1.04, corrected: false, rawSg: null });
  });

  it('takes °Plato and Brix, and reads later Brix through alcohol', async () => {
    const b = await newBatch(member);
    const og = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 12, unit: 'plato' });
    expect(og.body.reading.gravitySg).toBeCloseTo(1.0484, 3);
    const brix = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-06T09:00:00Z', gravity: 6.5, unit: 'brix' });
    expect(brix.status).toBe(201);
    // 6.5 °Bx of a fermented beer is far below the 1.025 it would be in wort.
    expect(brix.body.reading.gravitySg).toBeLessThan(1.02);
    expect(brix.body.reading.gravitySg).toBeGreaterThan(1.0);
    expect(brix.body.reading.corrected).toBe(true);
    expect(brix.body.reading.method).toBe('alcohol_corrected');
    // −1 °P is about 0.9961, 108 % apparent attenuation from 1.0484 [C:F4.1]: stored once the user confirms it.
    const unconfirmed = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-07T09:00:00Z', gravity: -1.0, unit: 'plato' });
    expect(unconfirmed.status).toBe(422);
    expect(unconfirmed.body.detail).toMatch(/beyond the plausible 105 %/);
    const dry = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-07T09:00:00Z', gravity: -1.0, unit: 'plato', confirm: true });
    expect(dry.status).toBe(201);
    expect(dry.body.reading.gravitySg).toBeLessThan(1.0);
  });

  it('refuses duplicates (409), future times and impossible gravities (422)', async () => {
    const b = await newBatch(member);
    expect((await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' })).status).toBe(201);
    const dup = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T11:00:00+02:00', gravity: 1.049, unit: 'sg' });
    expect(dup.status).toBe(409);
    const future = await member.post(`/api/batches/${b.id}/readings`, {
      takenAt: new Date(ctx.clock.now().getTime() + 3 * DAY).toISOString(),
      gravity: 1.04,
      unit: 'sg',
    });
    expect(future.status).toBe(422);
    expect(future.body.errors[0].path).toBe('takenAt');
    const high = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-02T09:00:00Z', gravity: 1.3, unit: 'sg' });
    expect(high.status).toBe(422);
    expect(high.body.errors[0].path).toBe('gravity');
    const unit = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-02T09:00:00Z', gravity: 1.03, unit: 'oechsle' });
    expect(unit.status).toBe(422);
    expect(unit.body.errors[0].path).toBe('unit');
    expect(await countReadings(ctx, b.id)).toBe(1);
  });

  it('lets the brewer on duty read and add readings on any batch, the treasurer only read, other members nothing', async () => {
    const b = await newBatch(member);
    expect((await member2.get(`/api/batches/${b.id}`)).status).toBe(404);
    expect((await member2.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' })).status).toBe(404);
    expect((await treasurer.get(`/api/batches/${b.id}`)).status).toBe(200);
    expect((await treasurer.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' })).status).toBe(403);
    const byBrewer = await brewer.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' });
    expect(byBrewer.status).toBe(201);
    expect(byBrewer.body.reading.createdByName).toBe('Ada Kettleby');
    const page = await member.get(`/api/batches/${b.id}/readings?sort=takenAt&order=desc`);
    expect(page.body).toMatchObject({ total: 1, page: 1 });
    expect(page.body.items[0].id).toBe(byBrewer.body.reading.id);
  });

  it('deletes a mistyped reading (owner or brewer) and recomputes', async () => {
    const b = await newBatch(member);
    const keep = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' });
    const typo = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-02T09:00:00Z', gravity: 1.005, unit: 'sg' });
    expect((await member2.delete(`/api/batches/${b.id}/readings/${typo.body.reading.id}`)).status).toBe(404);
    expect((await treasurer.delete(`/api/batches/${b.id}/readings/${typo.body.reading.id}`)).status).toBe(403);
    expect((await member.delete(`/api/batches/${b.id}/readings/${typo.body.reading.id}`)).status).toBe(204);
    expect((await member.delete(`/api/batches/${b.id}/readings/${typo.body.reading.id}`)).status).toBe(404);
    const d = (await member.get(`/api/batches/${b.id}`)).body;
    expect(d.readingsCount).toBe(1);
    expect(d.og).toBe(1.05);
    expect(keep.status).toBe(201);
  });
});

describe('fermentation settings and refractometer readings', () => {
  it('applies the co-op’s stable-gravity rule from Settings → Fermentation', async () => {
    const b = await newBatch(member);
    for (const [i, sg] of [1.05, 1.03, 1.015, 1.012, 1.012, 1.012].entries()) {
      await member.post(`/api/batches/${b.id}/readings`, { takenAt: at('2026-10-01T08:00:00Z', i), gravity: sg, unit: 'sg' });
    }
    // Common practice by default: within 0.001 over 3 days; the last three readings span only 2.
    expect((await member.get(`/api/batches/${b.id}`)).body.stable).toMatchObject({ stable: false, toleranceSg: 0.001, spanDays: 3 });
    expect(
      (await member.put('/api/settings/fermentation', { stableToleranceSg: 0.001, stableSpanDays: 2, hydrometerCalibrationC: 20, wortCorrectionFactor: 1.04 }))
        .status,
    ).toBe(403);
    const put = await admin.put('/api/settings/fermentation', {
      stableToleranceSg: 0.001,
      stableSpanDays: 2,
      hydrometerCalibrationC: 20,
      wortCorrectionFactor: 1.04,
    });
    expect(put.status).toBe(200);
    const d = (await member.get(`/api/batches/${b.id}`)).body;
    expect(d.stable).toMatchObject({ stable: true, spanDays: 2 });
    expect(d.fg).toBe(1.012);
    await admin.put('/api/settings/fermentation', { stableToleranceSg: 0.001, stableSpanDays: 3, hydrometerCalibrationC: 20, wortCorrectionFactor: 1.04 });
  });

  it('reads alcohol-corrected Brix again when an earlier original gravity arrives, and keeps a wort reading wort', async () => {
    const b = await newBatch(member);
    // A refractometer reading mid-fermentation cannot be corrected for alcohol before the batch has an OG.
    const refused = await member.post(`/api/batches/${b.id}/readings`, {
      takenAt: '2026-10-05T09:00:00Z',
      gravity: 7,
      unit: 'brix',
      method: 'alcohol_corrected',
    });
    expect(refused.status).toBe(422);
    expect(refused.body.detail).toMatch(/needs the batch’s original gravity/);
    // Alone, it can only be read as wort, and says so.
    const asWortReading = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-05T09:00:00Z', gravity: 7, unit: 'brix' });
    expect(asWortReading.body.reading).toMatchObject({ method: 'wort' });
    const asWort = asWortReading.body.reading.gravitySg;
    expect(asWort).toBeCloseTo(brixToSg(7 / 1.04), 4);
    // The brew-day OG typed in afterwards, and a later Brix reading read through alcohol.
    expect((await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.06, unit: 'sg' })).status).toBe(201);
    const later = await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-06T09:00:00Z', gravity: 6.5, unit: 'brix' });
    expect(later.body.reading).toMatchObject({ method: 'alcohol_corrected' });
    let page = await member.get(`/api/batches/${b.id}/readings?sort=takenAt&order=desc`);
    expect(page.body.items.map((r: { method: string | null }) => r.method)).toEqual(['alcohol_corrected', 'wort', null]);
    expect(page.body.items[1].gravitySg).toBeCloseTo(asWort, 4); // what the user saw and chose stays
    // A still earlier OG changes the original Brix: the alcohol-corrected reading is read again.
    expect((await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-09-30T09:00:00Z', gravity: 1.056, unit: 'sg' })).status).toBe(201);
    page = await member.get(`/api/batches/${b.id}/readings?sort=takenAt&order=desc`);
    const reread = page.body.items[0];
    expect(reread.enteredUnit).toBe('brix');
    expect(reread.gravitySg).toBeCloseTo(refractometerFinalGravity(convertGravity(1.056, 'sg', 'brix') * 1.04, 6.5, 1.04), 4); // Terrill cubic
    expect(reread.gravitySg).not.toBeCloseTo(later.body.reading.gravitySg, 4);
  });
});

describe('the batches list', () => {
  it('shows a member only their own batches and the brewer on duty all, paged and sorted on the server', async () => {
    await newBatch(member2, { name: 'Second member stout' });
    const ownLager = await createBatch(ctx.db, { ownerId: member.user.id, name: 'Own lager', style: 'Pilsner' });
    const mine = await member.get('/api/batches?pageSize=100');
    expect(mine.status).toBe(200);
    expect(mine.body.items.length).toBeGreaterThan(0);
    expect(mine.body.items.every((i: { ownerId: string }) => i.ownerId === member.user.id)).toBe(true);
    expect(mine.body.items.map((i: { id: string }) => i.id)).toContain(ownLager.id);
    const all = await brewer.get('/api/batches?pageSize=100');
    const owners = new Set(all.body.items.map((i: { ownerId: string }) => i.ownerId));
    expect(owners.has(member.user.id) && owners.has(member2.user.id)).toBe(true);
    expect(all.body.total).toBeGreaterThanOrEqual(mine.body.total);

    const byName = await brewer.get('/api/batches?sort=name&order=asc&pageSize=5&page=1');
    expect(byName.body).toMatchObject({ page: 1, pageSize: 5 });
    const names = byName.body.items.map((i: { name: string }) => i.name);
    expect(names).toEqual([...names].sort((a: string, b: string) => a.localeCompare(b, 'en', { sensitivity: 'base' }) || 0));
    const page2 = await brewer.get('/api/batches?sort=name&order=asc&pageSize=5&page=2');
    expect(page2.body.items.map((i: { id: string }) => i.id)).not.toContain(byName.body.items[0].id);

    const stout = await brewer.get('/api/batches?q=second%20member');
    expect(stout.body.items.map((i: { name: string }) => i.name)).toContain('Second member stout');
    const planned = await brewer.get('/api/batches?status=planned&pageSize=100');
    expect(planned.body.items.every((i: { status: string }) => i.status === 'planned')).toBe(true);
    expect((await brewer.get('/api/batches?sort=password')).status).toBe(422);
  });

  it('carries OG and current gravity in each row', async () => {
    const b = await newBatch(member, { name: 'Listed with readings' });
    await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-11-01T09:00:00Z', gravity: 1.062, unit: 'sg' });
    await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-11-04T09:00:00Z', gravity: 1.02, unit: 'sg' });
    const list = await member.get('/api/batches?q=Listed%20with%20readings');
    expect(list.body.items[0]).toMatchObject({
      og: 1.062,
      currentGravity: 1.02,
      readingsCount: 2,
      lastReadingAt: '2026-11-04T09:00:00.000Z',
      status: 'fermenting',
    });
  });
});

describe('production records', () => {
  let batchId: string;
  beforeAll(async () => {
    const b = await newBatch(member, { name: 'Records pale ale', volumeLiters: 60 });
    batchId = b.id;
    await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-01T09:00:00Z', gravity: 1.05, unit: 'sg' });
    await member.post(`/api/batches/${b.id}/readings`, { takenAt: '2026-10-12T09:00:00Z', gravity: 1.01, unit: 'sg' });
    await member.patch(`/api/batches/${b.id}`, { status: 'conditioning' });
    const packaged = await member.patch(`/api/batches/${b.id}`, { status: 'packaged', packagedLiters: 57, packagedAt: '2026-10-20T15:00:00Z' });
    expect(packaged.status).toBe(200);
  });

  it('reports litres and US barrels per batch and month, with ABV and the licensing note', async () => {
    const res = await treasurer.get('/api/production-records?from=2026-10&to=2026-10');
    expect(res.status).toBe(200);
    const row = res.body.rows.find((r: { batchId: string }) => r.batchId === batchId);
    expect(row).toMatchObject({ month: '2026-10', batchName: 'Records pale ale', packagedLiters: 57, og: 1.05, fg: 1.01 });
    expect(row.usBarrels).toBeCloseTo(litersToUsBarrels(57), 4);
    expect(row.abv).toBeCloseTo(abv(1.05, 1.01), 3);
    expect(res.body.note).toMatch(/local licensing and excise rules govern/i);
    const oct = res.body.months.find((m: { month: string }) => m.month === '2026-10');
    expect(oct.packagedLiters).toBeGreaterThanOrEqual(57);
    const none = await treasurer.get('/api/production-records?from=2026-09&to=2026-09');
    expect(none.body.rows.find((r: { batchId: string }) => r.batchId === batchId)).toBeUndefined();
  });

  it('exports CSV and XLSX for the treasurer; a member sees only their own and cannot export', async () => {
    const csv = await treasurer.get('/api/production-records/export?from=2026-10&to=2026-10&format=csv');
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    const parsed = Papa.parse<string[]>(csv.text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data;
    expect(parsed[0]).toEqual(['Month', 'Batch', 'Style', 'Member', 'Packaged (L)', 'US barrels (31 gal)', 'OG', 'FG', 'ABV % (ASBC/Balling)']);
    expect(parsed.some((r) => r[1] === 'Records pale ale' && r[4] === '57')).toBe(true);
    expect(parsed[parsed.length - 1]![0]).toBe('Note');

    const xlsx = await treasurer.get('/api/production-records?from=2026-10&to=2026-10&format=xlsx').buffer(true).parse(binary);
    expect(xlsx.status).toBe(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.body as never);
    const sheet = wb.getWorksheet('Production records')!;
    const values: unknown[][] = [];
    sheet.eachRow((r) => values.push((r.values as unknown[]).slice(1)));
    expect(values.some((r) => r[1] === 'Records pale ale' && r[4] === 57)).toBe(true);

    const own = await member.get('/api/production-records?from=2026-09&to=2026-11');
    expect(own.status).toBe(200);
    const ownerNames = new Set(own.body.rows.map((r: { ownerName: string }) => r.ownerName));
    expect([...ownerNames].every((n) => n === member.user.name)).toBe(true);
    expect((await member.get('/api/production-records/export?format=csv')).status).toBe(403);
    expect((await treasurer.get('/api/production-records?from=2026-13')).status).toBe(422);
  });
});
