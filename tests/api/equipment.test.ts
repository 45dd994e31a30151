import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBatch, createBooking, createCo2Cylinder, createFermenter, createKeg, createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import { fixtureEquipment, fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import { createTestContext, type TestContext } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';

let ctx: TestContext;
/** What this file adds to the fixture's registry (db/fixtures): a second 60 L and 120 L fermenter, and a cylinder numbered past 9. */
const added = { fermenters: 2, cylinders: 1 };
beforeAll(async () => {
  ctx = await createTestContext();
  await createFermenter(ctx.db, { code: 'F-05', name: '60 L fermenter 2', capacityLiters: 60 });
  await createFermenter(ctx.db, { code: 'F-06', name: '120 L conical 2', capacityLiters: 120, attributes: { style: 'conical' } });
  await createCo2Cylinder(ctx.db, { code: 'C-10' });
});
const fixtureCount = (kind: string) => fixtureEquipment.filter((e) => e.kind === kind).length;
afterAll(async () => ctx?.close());

interface Item {
  id: string;
  code: string;
  kind: string;
  name: string;
  capacityLiters: number | null;
  state: string;
}

/** The PDF's text layer, by Debian's pdftotext, and its page facts by pdfinfo. */
function pdfFacts(pdf: Buffer): { text: string; pages: number; pageSize: string } {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'labels-')), 'labels.pdf');
  fs.writeFileSync(file, pdf);
  const text = execFileSync('/usr/bin/pdftotext', [file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
  const info = execFileSync('/usr/bin/pdfinfo', [file], { encoding: 'utf8' });
  return { text, pages: Number(/Pages:\s+(\d+)/.exec(info)?.[1]), pageSize: /Page size:\s+(.+)/.exec(info)?.[1] ?? '' };
}

describe('the equipment list', () => {
  it("lists the co-op's equipment, paged, for any signed-in person", async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.get('/api/equipment?pageSize=20');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ total: fixtureEquipment.length + added.fermenters + added.cylinders, page: 1, pageSize: 20 });
    expect(res.body.items).toHaveLength(20);
    const first = res.body.items[0];
    expect(Object.keys(first)).toEqual(expect.arrayContaining(['id', 'code', 'kind', 'name', 'capacityLiters', 'state', 'attributes', 'notes']));
    // Codes sort by number within their letter: C-1, C-2, C-10, then F-01 …
    expect(res.body.items.slice(0, 5).map((i: Item) => i.code)).toEqual(['C-1', 'C-2', 'C-10', 'F-01', 'F-02']);
    expect((await request(ctx.app).get('/api/equipment')).status).toBe(401);
  });

  it('filters by kind and state and searches codes and names', async () => {
    const member = await ctx.signIn('member@example.org');
    const kegs = await member.get('/api/equipment?kind=keg&pageSize=100');
    expect(kegs.body.total).toBe(fixtureCount('keg'));
    expect(kegs.body.items.every((i: Item) => i.kind === 'keg' && i.capacityLiters === 19)).toBe(true);
    const dirty = await member.get('/api/equipment?kind=keg&state=needs_cleaning');
    expect(dirty.body.total).toBeGreaterThan(0);
    expect(dirty.body.items.every((i: Item) => i.state === 'needs_cleaning')).toBe(true);
    const fermenters = await member.get('/api/equipment?kind=fermenter&pageSize=100');
    const sizes = fermenters.body.items.map((i: Item) => i.capacityLiters);
    expect(sizes.filter((s: number) => s === 30)).toHaveLength(2);
    expect(sizes.filter((s: number) => s === 60)).toHaveLength(2);
    expect(sizes.filter((s: number) => s === 120)).toHaveLength(2);
    const q = await member.get('/api/equipment?q=conical');
    expect(q.body.items.map((i: Item) => i.code).sort()).toEqual(['F-04', 'F-06']);
    const taps = await member.get('/api/equipment?kind=tap');
    expect(taps.body.total).toBe(fixtureCount('tap'));
    expect(taps.body.items[0].attributes).toMatchObject({ lineInsideDiameterMm: expect.any(Number), lineLengthM: expect.any(Number), coldRoomTempC: 3 });
  });

  it('sorts on the server by an allowlisted field and pages through', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.get('/api/equipment?kind=fermenter&sort=capacityLiters&order=desc&pageSize=3&page=1');
    expect(res.body.items.map((i: Item) => i.capacityLiters)).toEqual([120, 120, 60]);
    const page2 = await member.get('/api/equipment?kind=fermenter&sort=capacityLiters&order=desc&pageSize=4&page=2');
    expect(page2.body.items.map((i: Item) => i.capacityLiters)).toEqual([30, 30]);
    const bad = await member.get('/api/equipment?sort=password');
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].path).toBe('sort');
    expect((await member.get('/api/equipment?kind=barrel')).status).toBe(422);
  });
});

describe("an item's page", () => {
  it('shows the item with its history of states and its upcoming bookings, owners hidden from members', async () => {
    // F-02 cleaned one day, sanitized the next, then filled with another member's batch; a later booking of it.
    const now = ctx.clock.now().getTime();
    const f02Id = fixtureEquipmentId('F-02');
    const brewerId = fixtureUserId('brewer');
    await createSanitationCycle(ctx.db, { equipmentId: f02Id, readyAt: new Date(now - 6 * DAY), until: 'cleaned', recordedBy: brewerId });
    await createSanitationCycle(ctx.db, { equipmentId: f02Id, readyAt: new Date(now - 5 * DAY), recordedBy: brewerId });
    await createBatch(ctx.db, {
      ownerId: fixtureUserId('member2'),
      readings: [{ takenAt: new Date(now - 4 * DAY + HOUR), value: 1.052 }],
      fermenter: { equipmentId: f02Id, startsAt: new Date(now - 4 * DAY), endsAt: new Date(now + 10 * DAY), now: new Date(now) },
    });
    await createBooking(ctx.db, {
      equipmentId: f02Id,
      ownerId: fixtureUserId('member3'),
      startsAt: new Date(now + 12 * DAY),
      endsAt: new Date(now + 30 * DAY),
      now: new Date(now),
    });

    const member = await ctx.signIn('member@example.org');
    const list = await member.get('/api/equipment?q=F-02');
    const f02 = list.body.items[0] as Item;
    expect(f02.id).toBe(f02Id);
    const res = await member.get(`/api/equipment/${f02.id}`);
    expect(res.status).toBe(200);
    expect(res.body.equipment).toMatchObject({ code: 'F-02', kind: 'fermenter', state: 'holding' });
    expect(res.body.history.map((h: { toState: string }) => h.toState)).toEqual(['holding', 'ready', 'cleaned', 'needs_cleaning']);
    expect(res.body.history[0]).toMatchObject({ toState: 'holding', reason: expect.any(String), actor: { name: 'Tobias Quill' } });
    expect(res.body.history[1]).toMatchObject({ fromState: 'cleaned', toState: 'ready', actor: { name: 'Ada Kettleby' } });
    expect(res.body.history.at(-1)).toMatchObject({ fromState: null, toState: 'needs_cleaning', reason: 'Added to the registry' });
    expect(res.body.upcomingBookings.length).toBeGreaterThanOrEqual(1);
    for (const b of res.body.upcomingBookings.filter((x: { mine: boolean }) => !x.mine)) expect(b).not.toHaveProperty('owner');
    const brewer = await ctx.signIn('brewer@example.org');
    const asBrewer = await brewer.get(`/api/equipment/${f02.id}`);
    expect(asBrewer.body.upcomingBookings.every((b: { owner?: object }) => b.owner)).toBe(true);
  });

  it('answers an unknown or malformed id with 404', async () => {
    const member = await ctx.signIn('member@example.org');
    expect((await member.get('/api/equipment/00000000-0000-4000-8000-000000000000')).status).toBe(404);
    const bad = await member.get('/api/equipment/not-an-id');
    expect(bad.status).toBe(404);
    expect(bad.headers['content-type']).toMatch(/problem\+json/);
  });
});

describe('changing states', () => {
  it('lets the brewer on duty change a state with a reason, recorded in the history with who and when', async () => {
    const brewer = await ctx.signIn('brewer@example.org');
    const made = await createKeg(ctx.db);
    const keg = ((await brewer.get('/api/equipment?kind=keg&state=needs_cleaning&pageSize=100')).body.items as Item[]).find((i) => i.id === made.id)!;
    expect(keg).toBeTruthy();
    const res = await brewer.post(`/api/equipment/${keg.id}/state`, { state: 'cleaned', reason: 'Soaked in alkaline cleaner and rinsed' });
    expect(res.status).toBe(200);
    expect(res.body.equipment.state).toBe('cleaned');
    expect(res.body.history[0]).toMatchObject({
      fromState: 'needs_cleaning',
      toState: 'cleaned',
      reason: 'Soaked in alkaline cleaner and rinsed',
      actor: { id: brewer.user.id, name: brewer.user.name },
    });
    const row = await ctx.db
      .selectFrom('equipment_state_change')
      .selectAll()
      .where('equipment_id', '=', keg.id)
      .orderBy('at', 'desc')
      .executeTakeFirstOrThrow();
    expect(row).toMatchObject({ to_state: 'cleaned', actor_id: brewer.user.id });
    const auditRow = await ctx.db.selectFrom('audit_log').selectAll().where('subject_id', '=', keg.id).where('action', '=', 'state_changed').executeTakeFirst();
    expect(auditRow).toBeTruthy();
    // The same state again is a conflict; a reason is required.
    expect((await brewer.post(`/api/equipment/${keg.id}/state`, { state: 'cleaned', reason: 'Again' })).status).toBe(409);
    const noReason = await brewer.post(`/api/equipment/${keg.id}/state`, { state: 'ready' });
    expect(noReason.status).toBe(422);
    expect(noReason.body.errors[0].path).toBe('reason');
  });

  it('does not let a member or the treasurer change states', async () => {
    const made = await createKeg(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: made.id, readyAt: new Date(ctx.clock.now().getTime() - HOUR) });
    const ready = (await (await ctx.signIn('admin@example.org')).get('/api/equipment?kind=keg&state=ready')).body.items as Item[];
    const keg = ready.find((i) => i.id === made.id)!;
    expect(keg).toBeTruthy();
    for (const email of ['member@example.org', 'treasurer@example.org']) {
      const api = await ctx.signIn(email);
      const res = await api.post(`/api/equipment/${keg.id}/state`, { state: 'out_of_service', reason: 'Just because' });
      expect(res.status).toBe(403);
    }
    const after = await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow();
    expect(after.state).toBe('ready');
  });
});

describe('the registry (admin)', () => {
  it("lets the admin add an item with its kind's attributes, and refuses a taken code", async () => {
    const admin = await ctx.signIn('admin@example.org');
    const body = { code: 'K-061', kind: 'keg', name: '19 L ball lock keg 61', capacityLiters: 19, attributes: { serial: 'LY19-B01427', lock: 'ball' } };
    const res = await admin.post('/api/equipment', body);
    expect(res.status).toBe(201);
    expect(res.body.equipment).toMatchObject({ code: 'K-061', kind: 'keg', state: 'needs_cleaning', capacityLiters: 19, attributes: { lock: 'ball' } });
    const detail = await admin.get(`/api/equipment/${res.body.equipment.id}`);
    expect(detail.body.history).toHaveLength(1);
    const again = await admin.post('/api/equipment', body);
    expect(again.status).toBe(409);
    expect(again.body.detail).toMatch(/K-061/);
    const wrong = await admin.post('/api/equipment', { ...body, code: 'K-062', attributes: { lock: 'bayonet' } });
    expect(wrong.status).toBe(422);
    expect(wrong.body.errors.map((e: { path: string }) => e.path)).toEqual(expect.arrayContaining(['attributes.serial', 'attributes.lock']));
    expect((await admin.post('/api/equipment', { ...body, code: 'keg 62' })).status).toBe(422);
  });

  it('lets the admin edit details; the brewer on duty and members may not', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const tap = (await admin.get('/api/equipment?kind=tap&q=T-3')).body.items[0] as Item;
    const res = await admin.patch(`/api/equipment/${tap.id}`, { notes: 'New faucet fitted', attributes: { lineLengthM: 4.2 } });
    expect(res.status).toBe(200);
    expect(res.body.equipment.notes).toBe('New faucet fitted');
    expect(res.body.equipment.attributes).toMatchObject({ lineLengthM: 4.2, lineInsideDiameterMm: 4.8 });
    expect((await admin.patch(`/api/equipment/${tap.id}`, { attributes: { lineLengthM: -1 } })).status).toBe(422);
    for (const email of ['brewer@example.org', 'member@example.org']) {
      const api = await ctx.signIn(email);
      expect((await api.patch(`/api/equipment/${tap.id}`, { notes: 'x' })).status).toBe(403);
      expect(
        (
          await api.post('/api/equipment', {
            code: 'T-9',
            kind: 'tap',
            name: 'Tap 9',
            attributes: { position: 'x', lineLengthM: 3, lineInsideDiameterMm: 4.8 },
          })
        ).status,
      ).toBe(403);
    }
  });
});

describe('QR label sheets', () => {
  it('makes an A4 PDF whose text layer holds every selected code, 24 labels a page', async () => {
    for (let i = 0; i < 20; i++) await createKeg(ctx.db);
    const member = await ctx.signIn('member@example.org');
    const kegs = (await member.get('/api/equipment?kind=keg&pageSize=30')).body.items as Item[];
    expect(kegs).toHaveLength(30);
    const fermenters = (await member.get('/api/equipment?kind=fermenter&pageSize=12')).body.items as Item[];
    const picked = [...fermenters, ...kegs];
    const res = await member
      .get(`/api/equipment/labels.pdf?ids=${picked.map((i) => i.id).join(',')}`)
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const pdf = res.body as Buffer;
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    const { text, pages, pageSize } = pdfFacts(pdf);
    for (const item of picked) expect(text).toContain(item.code);
    expect(text).toContain(fermenters[0]!.name);
    expect(text).toMatch(/never exceed/i); // kegs carry the pressure caution
    expect(picked).toHaveLength(36);
    expect(pages).toBe(2); // 36 labels at 24 a page
    expect(pageSize).toMatch(/^595\.\d+ x 841\.\d+ pts \(A4\)/);
  });

  it('refuses an empty or unknown selection', async () => {
    const member = await ctx.signIn('member@example.org');
    expect((await member.get('/api/equipment/labels.pdf')).status).toBe(422);
    expect((await member.get('/api/equipment/labels.pdf?ids=00000000-0000-4000-8000-000000000000')).status).toBe(404);
  });
});

describe('the next free code (admin hint for the add form)', () => {
  it("suggests one past the highest code of each kind, padded like that kind's codes", async () => {
    const admin = await ctx.signIn('admin@example.org');
    const codes: Record<string, string> = {};
    for (const kind of ['fermenter', 'keg', 'tap', 'co2_cylinder']) {
      const res = await admin.get(`/api/equipment/next-code?kind=${kind}`);
      expect(res.status).toBe(200);
      codes[kind] = res.body.code;
    }
    // The fixture has F-01…F-04, K-001…K-012, T-1…T-4 and C-1, C-2; this file added F-05, F-06 and C-10, and kegs above.
    const kegs = await ctx.db.selectFrom('equipment').select('code').where('kind', '=', 'keg').execute();
    const highestKeg = Math.max(...kegs.map((k) => Number(k.code.split('-')[1])));
    expect(highestKeg).toBeGreaterThanOrEqual(61);
    expect(codes).toEqual({ fermenter: 'F-07', keg: `K-${String(highestKeg + 1).padStart(3, '0')}`, tap: 'T-5', co2_cylinder: 'C-11' });

    // Taking the suggestion moves the hint on; a suggested code is free to create.
    const created = await admin.post('/api/equipment', {
      kind: 'tap',
      code: codes.tap,
      name: 'Tap 5',
      attributes: { position: 'Cold room, right wall, 1', lineLengthM: 3, lineInsideDiameterMm: 4.8 },
    });
    expect(created.status).toBe(201);
    expect((await admin.get('/api/equipment/next-code?kind=tap')).body.code).toBe('T-6');
  });

  it("is the admin's only and needs a known kind", async () => {
    const admin = await ctx.signIn('admin@example.org');
    expect((await admin.get('/api/equipment/next-code?kind=barrel')).status).toBe(422);
    expect((await admin.get('/api/equipment/next-code')).status).toBe(422);
    const member = await ctx.signIn('member@example.org');
    expect((await member.get('/api/equipment/next-code?kind=keg')).status).toBe(403);
    const brewer = await ctx.signIn('brewer@example.org');
    expect((await brewer.get('/api/equipment/next-code?kind=keg')).status).toBe(403);
  });
});
