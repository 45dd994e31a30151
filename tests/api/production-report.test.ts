import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { litersToUsBarrels } from '../../shared/brewing/index.ts';
import { createBatch, createFermenter, createKeg, createKegCheckout, createMember, createTransfer } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';

/**
 * The monthly production report on a scenario worked out by hand (three months, litres):
 *
 *   A  40 L brewed 3 Jul; 20 Jul drawn 37.5 into K1 and K2 (18 + 18, 1.5 lost), 2.5 left in the fermenter;
 *      K1 checked out to a member 5 Aug, K2 emptied on tap 25 Aug.
 *   B  30 L brewed 25 Jul; 20 Aug drawn 19.5 into K3 (18.5, 1.0 lost), 10.5 left in the fermenter;
 *      K3 dumped 10 Sep.
 *   C  25 L brewed 15 Aug; discarded in its fermenter 5 Sep.
 *   D  20 L brewed 12 Sep; still fermenting at the end of September.
 *
 *   month | opening | brewed | removals        | losses                        | closing (fermenters + kegs)
 *   Jul   |   0     |  70    |  0              | 1.5 + 2.5 = 4                 | 30 + 36  = 66
 *   Aug   |  66     |  25    | 18 out + 18 served | 1.0 + 10.5 = 11.5          | 25 + 18.5 = 43.5
 *   Sep   |  43.5   |  20    |  0              | 18.5 keg + 25 batch = 43.5    | 20 + 0   = 20
 *
 * Each month: opening + brewed − removals − losses = closing.
 */

let ctx: TestContext;
let treasurer: ApiClient, brewer: ApiClient, member: ApiClient;
const kegs: Record<'K1' | 'K2' | 'K3', string> = { K1: '', K2: '', K3: '' };
const at = (iso: string) => new Date(iso);

useTestContext(async (created) => {
  ctx = created;
  [treasurer, brewer, member] = await signInAs(ctx, 'treasurer', 'brewer', 'member');
  const owner = fixtureUserId('member');
  const readings = (brewed: string, ...later: [string, number][]) => [
    { takenAt: at(brewed), value: 1.05 },
    ...later.map(([t, v]) => ({ takenAt: at(t), value: v })),
  ];
  for (const k of ['K1', 'K2', 'K3'] as const) kegs[k] = (await createKeg(ctx.db)).id;

  const a = await createBatch(ctx.db, {
    ownerId: owner,
    name: 'Report A',
    volumeLiters: 40,
    readings: readings('2026-07-03T09:00:00Z', ['2026-07-10T09:00:00Z', 1.01], ['2026-07-13T09:00:00Z', 1.01]),
  });
  await createTransfer(ctx.db, {
    batchId: a.id,
    fromEquipmentId: (await createFermenter(ctx.db)).id,
    kegIds: [kegs.K1, kegs.K2],
    kegVolumesLiters: [18, 18],
    volumeLiters: 37.5,
    at: '2026-07-20T12:00:00Z',
  });
  const b = await createBatch(ctx.db, {
    ownerId: owner,
    name: 'Report B',
    volumeLiters: 30,
    readings: readings('2026-07-25T09:00:00Z', ['2026-08-10T09:00:00Z', 1.012], ['2026-08-14T09:00:00Z', 1.012]),
  });
  await createTransfer(ctx.db, {
    batchId: b.id,
    fromEquipmentId: (await createFermenter(ctx.db)).id,
    kegIds: [kegs.K3],
    kegVolumesLiters: [18.5],
    volumeLiters: 19.5,
    at: '2026-08-20T12:00:00Z',
  });
  const c = await createBatch(ctx.db, { ownerId: owner, name: 'Report C', volumeLiters: 25, readings: readings('2026-08-15T09:00:00Z') });
  await createBatch(ctx.db, { ownerId: owner, name: 'Report D', volumeLiters: 20, readings: readings('2026-09-12T09:00:00Z') });
  // Another member's planned batch was never brewed: it counts nowhere.
  await createBatch(ctx.db, { ownerId: (await createMember(ctx.db)).id, name: 'Never brewed', volumeLiters: 50, status: 'planned' });

  // What happened to the kegs and to C, recorded as the co-op records it, each on its day.
  await createKegCheckout(ctx.db, { kegId: kegs.K1, memberId: owner, at: '2026-08-05T17:00:00Z', dueAt: '2026-08-19T17:00:00Z' });
  ctx.clock.freeze('2026-08-25T21:00:00Z');
  expect((await brewer.post(`/api/kegs/${kegs.K2}/empty`, {})).status).toBe(200);
  ctx.clock.set('2026-09-05T12:00:00Z');
  expect((await member.patch(`/api/batches/${c.id}`, { status: 'discarded' })).status).toBe(200);
  ctx.clock.set('2026-09-10T12:00:00Z');
  expect((await brewer.post(`/api/kegs/${kegs.K3}/empty`, { dumped: true, note: 'Sour: infected' })).status).toBe(200);
  ctx.clock.set('2026-10-02T10:00:00Z').resume();
});

describe('the monthly production report', () => {
  it('adds brewing, removals, losses and month-end inventory per month, and every month balances', async () => {
    const res = await treasurer.get('/api/production-records?from=2026-07&to=2026-09');
    expect(res.status).toBe(200);
    const [jul, aug, sep] = res.body.monthly;
    expect(res.body.monthly.map((m: { month: string }) => m.month)).toEqual(['2026-07', '2026-08', '2026-09']);
    expect(jul).toMatchObject({
      month: '2026-07',
      openingLiters: 0,
      producedLiters: 70,
      packagedLiters: 36,
      removals: { checkedOutLiters: 0, servedLiters: 0, packagedOtherwiseLiters: 0, totalLiters: 0 },
      losses: { transferLiters: 1.5, leftInFermenterLiters: 2.5, dumpedKegLiters: 0, dumpedBatchLiters: 0, totalLiters: 4 },
      closing: { fermentersLiters: 30, kegsLiters: 36, totalLiters: 66 },
      balanceLiters: 0,
    });
    expect(aug).toMatchObject({
      openingLiters: 66,
      producedLiters: 25,
      packagedLiters: 18.5,
      removals: { checkedOutLiters: 18, servedLiters: 18, packagedOtherwiseLiters: 0, totalLiters: 36 },
      losses: { transferLiters: 1, leftInFermenterLiters: 10.5, dumpedKegLiters: 0, dumpedBatchLiters: 0, totalLiters: 11.5 },
      closing: { fermentersLiters: 25, kegsLiters: 18.5, totalLiters: 43.5 },
      balanceLiters: 0,
    });
    expect(sep).toMatchObject({
      openingLiters: 43.5,
      producedLiters: 20,
      packagedLiters: 0,
      removals: { totalLiters: 0 },
      losses: { transferLiters: 0, leftInFermenterLiters: 0, dumpedKegLiters: 18.5, dumpedBatchLiters: 25, totalLiters: 43.5 },
      closing: { fermentersLiters: 20, kegsLiters: 0, totalLiters: 20 },
      balanceLiters: 0,
    });
    for (const m of res.body.monthly) {
      expect(m.openingLiters + m.producedLiters - m.removals.totalLiters - m.losses.totalLiters, m.month).toBeCloseTo(m.closing.totalLiters, 6);
    }
    // Each month opens with what the one before closed with.
    expect(aug.openingLiters).toBe(jul.closing.totalLiters);
    expect(sep.openingLiters).toBe(aug.closing.totalLiters);

    // US barrels of 31 US gal = 117.347765304 L ([P] S19, 27 CFR 25.151; the litre value [C]), to 4 places.
    expect(jul.usBarrels.produced).toBe(0.5965); // 70 L [C] 70 / 117.347765304 = 0.596518
    expect(jul.usBarrels.closing).toBe(0.5624); // 66 L [C] = 0.562431
    expect(aug.usBarrels.closing).toBe(0.3707); // 43.5 L [C] = 0.370693
    expect(aug.usBarrels.removals).toBe(0.3068); // 36 L [C] = 0.306780
    expect(sep.usBarrels.losses).toBe(0.3707); // 43.5 L [C]
    expect(litersToUsBarrels(117.347765304)).toBeCloseTo(1, 9); // [P] S19: 1 bbl = 31 US gal
    expect(res.body.note).toMatch(/licensing and excise rules govern .* decide what must be filed/i);
  });

  it('records a dumped keg and a discarded batch with their time', async () => {
    const fill = await ctx.db.selectFrom('keg_fill').select(['emptied_reason', 'emptied_at']).where('keg_id', '=', kegs.K3).executeTakeFirstOrThrow();
    expect(fill).toEqual({ emptied_reason: 'dumped', emptied_at: at('2026-09-10T12:00:00Z') });
    const served = await ctx.db.selectFrom('keg_fill').select('emptied_reason').where('keg_id', '=', kegs.K2).executeTakeFirstOrThrow();
    expect(served.emptied_reason).toBe('emptied');
    const c = await ctx.db.selectFrom('batch').select(['status', 'discarded_at']).where('name', '=', 'Report C').executeTakeFirstOrThrow();
    expect(c).toEqual({ status: 'discarded', discarded_at: at('2026-09-05T12:00:00Z') });
  });

  it('gives a member only their own batches, and the CSV and XLSX carry the monthly report', async () => {
    const own = await ctx.signIn('member2@example.org');
    const mine = await own.get('/api/production-records?from=2026-07&to=2026-09');
    expect(mine.status).toBe(200);
    expect(
      mine.body.monthly.every((m: { producedLiters: number; closing: { totalLiters: number } }) => m.producedLiters === 0 && m.closing.totalLiters === 0),
    ).toBe(true);

    const csv = await treasurer.get('/api/production-records/export?from=2026-07&to=2026-09&format=csv');
    expect(csv.status).toBe(200);
    const rows = Papa.parse<string[]>(csv.text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data;
    const header = rows.findIndex((r) => r[0] === 'Month' && r[1] === 'Opening (L)');
    expect(header).toBeGreaterThan(0);
    const col = (name: string) => rows[header]!.indexOf(name);
    const aug = rows.find((r, i) => i > header && r[0] === '2026-08')!;
    expect(aug[col('Opening (L)')]).toBe('66');
    expect(aug[col('Removals (L)')]).toBe('36');
    expect(aug[col('Losses (L)')]).toBe('11.5');
    expect(aug[col('Closing (L)')]).toBe('43.5');
    expect(aug[col('Balance (L)')]).toBe('0');
    expect(aug[col('Closing (US bbl)')]).toBe('0.3707');
    expect(rows[rows.length - 1]![0]).toBe('Note');

    const xlsx = await treasurer.get('/api/production-records/export?from=2026-07&to=2026-09&format=xlsx').buffer(true).parse(binary);
    expect(xlsx.status).toBe(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.body as never);
    const sheet = wb.getWorksheet('Monthly report')!;
    const values: unknown[][] = [];
    sheet.eachRow((r) => values.push((r.values as unknown[]).slice(1)));
    expect(values[0]![0]).toBe('Month');
    // Months are date cells (the first day) shown as months.
    const sep = values.find((r) => r[0] instanceof Date && r[0].toISOString() === '2026-09-01T00:00:00.000Z')!;
    let sepCell: ExcelJS.Cell | undefined;
    sheet.eachRow((r) => {
      if (r.getCell(1).value === sep[0]) sepCell = r.getCell(1);
    });
    expect(sepCell!.numFmt).toBe('yyyy-mm');
    expect(sep[(values[0] as string[]).indexOf('Dumped kegs (L)')]).toBe(18.5);
    expect(sep[(values[0] as string[]).indexOf('Dumped batches (L)')]).toBe(25);
    expect(sep[(values[0] as string[]).indexOf('Closing (L)')]).toBe(20);
  });
});
