import { describe, expect, it } from 'vitest';
import { brixToSg, refractometerFinalGravity } from '../../shared/brewing/index.ts';
import { createBatch } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';

/**
 * Gravity readings that are physically possible: Brix readings carry how they were converted
 * (wort or alcohol-corrected), a gravity above the batch's OG is refused, and an apparent
 * attenuation beyond 105 % needs the user's confirmation. Every refusal writes nothing.
 */
let ctx: TestContext;
let member: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  member = await ctx.signIn('member@example.org');
});

const DAY = 86_400_000;
const at = (days: number) => new Date(ctx.clock.now().getTime() - 20 * DAY + days * DAY).toISOString();

async function newBatch(readings: { days: number; value: number; unit?: 'sg' | 'plato' | 'brix' }[] = []) {
  const batch = await createBatch(ctx.db, {
    ownerId: member.user.id,
    name: 'Method test batch',
    readings: readings.map((r) => ({ takenAt: at(r.days), value: r.value, unit: r.unit ?? 'sg' })),
  });
  return batch.id;
}

async function counts(batchId: string) {
  const [readings, audits] = await Promise.all([
    ctx.db
      .selectFrom('reading')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('batch_id', '=', batchId)
      .executeTakeFirstOrThrow(),
    ctx.db
      .selectFrom('audit_log')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('subject_id', '=', batchId)
      .executeTakeFirstOrThrow(),
  ]);
  return { readings: Number(readings.n), audits: Number(audits.n) };
}

function expectRefused(res: { status: number; body: any; headers: Record<string, string> }, message: RegExp) {
  expect(res.status, JSON.stringify(res.body)).toBe(422);
  expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  expect(res.body.detail).toMatch(message);
  expect(res.body.errors[0]).toMatchObject({ path: 'gravity', message: expect.stringMatching(message) });
}

describe('Brix readings stored with their method', () => {
  it('reads the first Brix reading of a batch as wort and later ones alcohol-corrected, and returns the method', async () => {
    const batchId = await newBatch();
    const og = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(0), gravity: 12, unit: 'brix' });
    expect(og.status, JSON.stringify(og.body)).toBe(201);
    expect(og.body.reading).toMatchObject({ method: 'wort', enteredUnit: 'brix' });
    expect(og.body.reading.gravitySg).toBeCloseTo(brixToSg(12 / 1.04), 4); // [C:F2.4⁻¹] wort factor 1.04 (common practice)
    const later = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(7), gravity: 6, unit: 'brix' });
    expect(later.status).toBe(201);
    expect(later.body.reading).toMatchObject({ method: 'alcohol_corrected' });
    expect(later.body.reading.gravitySg).toBeCloseTo(refractometerFinalGravity(12, 6, 1.04), 4); // [C:Terrill cubic] 1.0114
    const hydrometer = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(8), gravity: 1.012, unit: 'sg' });
    expect(hydrometer.body.reading.method).toBeNull();
    const list = await member.get(`/api/batches/${batchId}/readings?sort=takenAt&order=asc`);
    expect(list.body.items.map((r: { method: string | null }) => r.method)).toEqual(['wort', 'alcohol_corrected', null]);
  });

  it('takes the method the user chooses: a later wort sample stays wort', async () => {
    const batchId = await newBatch([{ days: 0, value: 1.05 }]);
    const res = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(0.1), gravity: 12, unit: 'brix', method: 'wort' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.reading).toMatchObject({ method: 'wort' });
    expect(res.body.reading.gravitySg).toBeCloseTo(brixToSg(12 / 1.04), 4); // [C:F2.4⁻¹]
    const row = await ctx.db.selectFrom('reading').select('method').where('id', '=', res.body.reading.id).executeTakeFirstOrThrow();
    expect(row.method).toBe('wort');
  });

  it('refuses an unknown method', async () => {
    const batchId = await newBatch([{ days: 0, value: 1.05 }]);
    const before = await counts(batchId);
    const res = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(1), gravity: 8, unit: 'brix', method: 'guess' });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].path).toBe('method');
    expect(await counts(batchId)).toEqual(before);
  });
});

describe('readings that cannot be true are refused and change nothing', () => {
  it('refuses a Brix reading the alcohol correction puts above the OG (20 → 18 °Bx)', async () => {
    const batchId = await newBatch([{ days: 0, value: 20, unit: 'brix' }]);
    const before = await counts(batchId);
    const res = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(2), gravity: 18, unit: 'brix' });
    // [C:Terrill cubic] 1.1147, above the OG 1.0796 [C:F2.4⁻¹ of 20 °Bx ÷ 1.04]
    expectRefused(res, /above the batch’s original gravity 1\.0796/);
    expect(await counts(batchId)).toEqual(before);
    // Confirming does not make it possible.
    expectRefused(
      await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(2), gravity: 18, unit: 'brix', confirm: true }),
      /above the batch’s original gravity/,
    );
    expect(await counts(batchId)).toEqual(before);
  });

  it('refuses a hydrometer reading above the OG', async () => {
    const batchId = await newBatch([
      { days: 0, value: 1.05 },
      { days: 3, value: 1.03 },
    ]);
    const before = await counts(batchId);
    expectRefused(
      await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(4), gravity: 1.055, unit: 'sg' }),
      /above the batch’s original gravity 1\.0500/,
    );
    expect(await counts(batchId)).toEqual(before);
  });

  it('refuses an alcohol-corrected reading on a batch with no OG yet, and an unfermented one', async () => {
    const empty = await newBatch();
    const before = await counts(empty);
    expectRefused(
      await member.post(`/api/batches/${empty}/readings`, { takenAt: at(1), gravity: 6, unit: 'brix', method: 'alcohol_corrected' }),
      /needs the batch’s original gravity/,
    );
    expect(await counts(empty)).toEqual(before);
    const status = await ctx.db.selectFrom('batch').select('status').where('id', '=', empty).executeTakeFirstOrThrow();
    expect(status.status).toBe('planned');

    const batchId = await newBatch([{ days: 0, value: 12, unit: 'brix' }]);
    const b2 = await counts(batchId);
    // 0 % attenuation: the correction was fitted to fermented beer; on wort it is off by several points.
    expectRefused(
      await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(1), gravity: 12, unit: 'brix', method: 'alcohol_corrected' }),
      /shows no fermentation yet/,
    );
    expect(await counts(batchId)).toEqual(b2);
  });

  it('refuses an apparent attenuation beyond 105 % unless the user confirms it', async () => {
    const batchId = await newBatch([{ days: 0, value: 1.04 }]);
    const before = await counts(batchId);
    // (1.040 − 0.996)/(1.040 − 1) = 110 % [C:F4.1] S8
    expectRefused(
      await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(10), gravity: 0.996, unit: 'sg' }),
      /apparent attenuation of 110 %.*confirm/,
    );
    expect(await counts(batchId)).toEqual(before);
    const confirmed = await member.post(`/api/batches/${batchId}/readings`, { takenAt: at(10), gravity: 0.996, unit: 'sg', confirm: true });
    expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(201);
    const audit = await ctx.db
      .selectFrom('audit_log')
      .select('detail')
      .where('subject_id', '=', batchId)
      .where('action', '=', 'reading:added')
      .executeTakeFirstOrThrow();
    expect(audit.detail).toMatchObject({ confirmed: true });
    // 50 % and 80 % [C:F4.1] need nothing.
    const other = await newBatch([{ days: 0, value: 1.05 }]);
    expect((await member.post(`/api/batches/${other}/readings`, { takenAt: at(3), gravity: 1.025, unit: 'sg' })).status).toBe(201);
    expect((await member.post(`/api/batches/${other}/readings`, { takenAt: at(6), gravity: 1.01, unit: 'sg' })).status).toBe(201);
  });
});

describe('imported readings follow the same rules', { timeout: 60_000 }, () => {
  it('gives a per-row error for a gravity above the OG and writes nothing', async () => {
    const batchId = await newBatch([{ days: 0, value: 1.05 }]);
    const before = await counts(batchId);
    const day = (d: number) => at(d).slice(0, 16).replace('T', ' ');
    const csv = ['Taken at,Gravity,Unit', `${day(1)},1.040,SG`, `${day(2)},1.062,SG`, `${day(3)},1.020,SG`].join('\n');
    const res = await member
      .post(`/api/batches/${batchId}/readings/import`)
      .field('mapping', JSON.stringify({ takenAt: 'Taken at', gravity: 'Gravity', unit: 'Unit', gravityUnit: 'sg', timeZone: 'UTC' }))
      .attach('file', Buffer.from(csv), { filename: 'r.csv', contentType: 'text/csv' });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.errors).toEqual([
      expect.objectContaining({ row: 3, path: 'gravity', message: expect.stringMatching(/above the batch’s original gravity/) }),
    ]);
    expect(await counts(batchId)).toEqual(before);
  });
});
