import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { beforeAll, describe, expect, it } from 'vitest';
import { abv, litersToUsBarrels } from '../../shared/brewing/index.ts';
import { createBatch, createBooking, createFermenter, DAY } from '../../db/factories/index.ts';
import { admin, brewer, ctx, member, member2, newBatch, treasurer, useBatchFile } from '../helpers/batches.ts';
import { binary } from '../helpers/http.ts';
import { FAR_AHEAD, withClockAt } from '../helpers/time.ts';

// Batches themselves: making and changing them, the list, and the production records they add up to.
// Their readings are tests/api/batch-readings.test.ts's.

useBatchFile();

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

  it('sorts by the latest reading (batches without one last) and by owner, counting every batch that matches', async () => {
    const early = await newBatch(member, { name: 'Sorted early reading' });
    const late = await newBatch(member, { name: 'Sorted late reading' });
    await newBatch(member, { name: 'Sorted no reading' });
    await member.post(`/api/batches/${early.id}/readings`, { takenAt: '2026-09-01T09:00:00Z', gravity: 1.05, unit: 'sg' });
    await member.post(`/api/batches/${late.id}/readings`, { takenAt: '2026-09-03T09:00:00Z', gravity: 1.05, unit: 'sg' });
    const byReading = await member.get('/api/batches?q=Sorted&sort=lastReadingAt&order=desc&pageSize=2&page=1');
    expect(byReading.body.total).toBe(3);
    expect(byReading.body.items.map((i: { name: string }) => i.name)).toEqual(['Sorted late reading', 'Sorted early reading']);
    const rest = await member.get('/api/batches?q=Sorted&sort=lastReadingAt&order=desc&pageSize=2&page=2');
    expect(rest.body.items).toMatchObject([{ name: 'Sorted no reading', lastReadingAt: null, readingsCount: 0, og: null }]);

    const byOwner = await brewer.get('/api/batches?sort=owner&order=desc&pageSize=100');
    const ownerNames = byOwner.body.items.map((i: { ownerName: string }) => i.ownerName);
    expect(ownerNames).toEqual([...ownerNames].sort((a: string, b: string) => b.localeCompare(a, 'en', { sensitivity: 'base' }) || 0));
    expect(byOwner.body.total).toBe(
      (
        await ctx.db
          .selectFrom('batch')
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .executeTakeFirstOrThrow()
      ).n,
    );
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

describe('changes are stamped by the clock', () => {
  it('a change to a batch, and the booking it lets go of, carry the clock’s time, whatever the real date', async () => {
    const now = ctx.clock.now().getTime();
    const inIt = await createBatch(ctx.db, {
      ownerId: member.user.id,
      name: 'Stamped',
      fermenter: { equipmentId: (await createFermenter(ctx.db)).id, startsAt: new Date(now + DAY), endsAt: new Date(now + 9 * DAY), now: new Date(now) },
    });
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const res = await member.patch(`/api/batches/${inIt.id}`, { notes: 'Checked years later', bookingId: null });
      expect(res.status).toBe(200);
      expect(res.body.batch).toMatchObject({ notes: 'Checked years later', updatedAt: FAR_AHEAD, bookings: [] });
      const booking = await ctx.db.selectFrom('booking').select(['batch_id', 'updated_at']).where('id', '=', inIt.bookingId!).executeTakeFirstOrThrow();
      expect(booking).toEqual({ batch_id: null, updated_at: new Date(FAR_AHEAD) });
    });
  });
});
