import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import {
  abv,
  apparentAttenuation,
  brixToSg,
  convertGravity,
  correctHydrometer,
  realAttenuation,
  refractometerFinalGravity,
} from '../../shared/brewing/index.ts';
import { DAY } from '../../db/factories/index.ts';
import { admin, brewer, ctx, daysAfter as at, member, member2, newBatch, treasurer, useBatchFile } from '../helpers/batches.ts';
import { pruneImportProgress } from '../../backend/modules/batches/readings-import.service.ts';
import { countReadings } from '../helpers/counts.ts';
import { FAR_AHEAD, laterBy, withClockAt } from '../helpers/time.ts';

// A batch's readings: what they say through the brewing maths, who may add and delete them, and the
// co-op's fermentation settings they are read with.

useBatchFile();

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

describe('readings-import stamps follow the clock', () => {
  it('stamps the progress row and the remembered mapping with the clock’s time, and forgets progress a day later by the clock', async () => {
    const b = await newBatch(member);
    const progressId = randomUUID();
    const progressUrl = `/api/batches/${b.id}/readings/import/progress/${progressId}`;
    const csv = 'Taken at,Gravity,Unit\n2026-10-01 09:00,1.050,SG\n2026-10-02 09:00,1.040,SG\n';
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const imported = await member
        .post(`/api/batches/${b.id}/readings/import`)
        .field('progressId', progressId)
        .attach('file', Buffer.from(csv), 'readings.csv');
      expect(imported.body).toEqual({ imported: 2, skipped: 0 });
      expect((await member.get(progressUrl)).body.progress).toMatchObject({ phase: 'done', updatedAt: FAR_AHEAD });
      const mapping = await ctx.db.selectFrom('reading_import_mapping').select('updated_at').where('user_id', '=', member.user.id).executeTakeFirstOrThrow();
      expect(mapping.updated_at).toEqual(new Date(FAR_AHEAD));

      await pruneImportProgress(ctx.db, new Date(laterBy(FAR_AHEAD, 23 * 3600_000)));
      expect((await member.get(progressUrl)).status).toBe(200);
      await pruneImportProgress(ctx.db, new Date(laterBy(FAR_AHEAD, 25 * 3600_000)));
      expect((await member.get(progressUrl)).status).toBe(404);
    });
  });
});
