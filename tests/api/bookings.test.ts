import { simpleParser } from 'mailparser';
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { createBooking, createFermenter, createKeg, createMember } from '../../db/factories/index.ts';
import { fixtureEquipmentId } from '../../db/fixtures/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { icsUtc, parseIcs } from '../helpers/ics.ts';
import { FAR_AHEAD, withClockAt } from '../helpers/time.ts';

let ctx: TestContext;
let fermenters: { id: string; code: string }[];
let kegs: { id: string; code: string }[];

const DAY = 24 * 3600_000;
/** A whole-hour UTC time `days` from the test's now (its clock), at `hour`. */
function at(days: number, hour = 10): string {
  const d = new Date(ctx.clock.now().getTime() + days * DAY);
  d.setUTCHours(hour, 0, 0, 0);
  return d.toISOString();
}
const plusHours = (iso: string, h: number) => new Date(Date.parse(iso) + h * 3600_000).toISOString();

useTestContext(async (created) => {
  ctx = created;
  // The fixture's F-01…F-04, and the fermenters these tests book besides: F-05 is out of service, F-11 and F-12 are 120 L.
  fermenters = ['F-01', 'F-02', 'F-03', 'F-04'].map((code) => ({ id: fixtureEquipmentId(code), code }));
  for (let i = 5; i <= 12; i++) {
    const code = `F-${String(i).padStart(2, '0')}`;
    const row = await createFermenter(ctx.db, { code, capacityLiters: i >= 11 ? 120 : 60, ...(i === 5 ? { state: 'out_of_service' as const } : {}) });
    fermenters.push({ id: row.id, code: row.code });
  }
  kegs = [];
  for (let i = 0; i < 2; i++) {
    const keg = await createKeg(ctx.db, { state: 'ready' });
    kegs.push({ id: keg.id, code: keg.code });
  }
});

const byCode = (code: string) => fermenters.find((f) => f.code === code)!;

/** New members with no bookings, so the "bookings at once" rule stays out of the way. */
async function quietMembers(n: number): Promise<string[]> {
  const emails: string[] = [];
  for (let i = 0; i < n; i++) emails.push((await createMember(ctx.db)).email);
  return emails;
}

describe('booking a free item', () => {
  it('books, answers 201 with the booking and its cleaning buffer, and e-mails a confirmation with a valid .ics', async () => {
    const member = await ctx.signIn('member@example.org');
    const startsAt = at(60);
    const endsAt = at(74);
    const res = await member.post('/api/bookings', { equipmentId: byCode('F-03').id, startsAt, endsAt });
    expect(res.status).toBe(201);
    const b = res.body.booking;
    expect(b).toMatchObject({ equipmentId: byCode('F-03').id, state: 'booked', mine: true, ownerId: member.user.id });
    expect(b.equipment).toMatchObject({ code: 'F-03', kind: 'fermenter' });
    expect(b.startsAt).toBe(startsAt);
    expect(b.endsAt).toBe(endsAt);
    expect(b.blockedUntil).toBe(plusHours(endsAt, 24)); // the co-op's 24 h cleaning buffer

    const mail = await ctx.waitForMail('member@example.org', /^Booked: F-03/);
    expect(mail.text_body).toContain('F-03');
    const parsed = await simpleParser(mail.raw);
    const att = parsed.attachments.find((a) => a.filename === 'booking.ics');
    expect(att).toBeTruthy();
    expect(att!.contentType).toBe('text/calendar');
    const cal = parseIcs(att!.content.toString('utf8'));
    expect(cal.type).toBe('VCALENDAR');
    expect(cal.get('VERSION')?.value).toBe('2.0');
    expect(cal.get('PRODID')?.value).toMatch(/Cellarwright/);
    expect(cal.get('METHOD')?.value).toBe('PUBLISH');
    const events = cal.components.filter((c) => c.type === 'VEVENT');
    expect(events).toHaveLength(1);
    const ev = events[0]!;
    expect(ev.get('UID')?.value).toBe(`booking-${b.id}@cellarwright.example.org`);
    expect(ev.get('DTSTAMP')?.value).toMatch(/^\d{8}T\d{6}Z$/);
    expect(icsUtc(ev.get('DTSTART')!.value).toISOString()).toBe(startsAt);
    expect(icsUtc(ev.get('DTEND')!.value).toISOString()).toBe(endsAt);
    expect(ev.get('SUMMARY')?.value).toContain('F-03');
    expect(ev.get('STATUS')?.value).toBe('CONFIRMED');

    // The booking and its audit row were written together.
    const auditRow = await ctx.db.selectFrom('audit_log').selectAll().where('subject_type', '=', 'Booking').where('subject_id', '=', b.id).executeTakeFirst();
    expect(auditRow?.action).toBe('booked');
  });

  it('answers an overlapping booking with a 409 problem naming the item and the period, and no owner to a member', async () => {
    const first = await ctx.signIn('member2@example.org');
    const startsAt = at(61);
    const endsAt = at(70);
    expect((await first.post('/api/bookings', { equipmentId: byCode('F-04').id, startsAt, endsAt })).status).toBe(201);

    const second = await ctx.signIn('member4@example.org');
    const res = await second.post('/api/bookings', { equipmentId: byCode('F-04').id, startsAt: at(65), endsAt: at(72) });
    expect(res.status).toBe(409);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({ status: 409, title: 'Slot taken', type: 'about:blank' });
    expect(res.body.detail).toMatch(/^F-04 is taken from /);
    expect(res.body.clash).toMatchObject({ code: 'F-04', equipmentId: byCode('F-04').id, startsAt, endsAt, blockedUntil: plusHours(endsAt, 24) });
    // "Taken", never whose.
    expect(res.body.clash.owner).toBeUndefined();
    expect(JSON.stringify(res.body)).not.toContain('member2');
    expect(JSON.stringify(res.body)).not.toContain(first.user.name);

    // The admin is told who holds it.
    const admin = await ctx.signIn('admin@example.org');
    const asAdmin = await admin.post('/api/bookings', { equipmentId: byCode('F-04').id, startsAt: at(65), endsAt: at(72), ownerId: second.user.id });
    expect(asAdmin.status).toBe(409);
    expect(asAdmin.body.detail).toContain(first.user.name);
    expect(asAdmin.body.clash.owner).toEqual({ id: first.user.id, name: first.user.name });
  });

  it('keeps the cleaning buffer free after a booking: starting at its end is a 409, starting after the buffer is fine', async () => {
    const a = await ctx.signIn('member5@example.org');
    const endsAt = at(70);
    expect((await a.post('/api/bookings', { equipmentId: byCode('F-06').id, startsAt: at(62), endsAt })).status).toBe(201);
    const b = await ctx.signIn('member6@example.org');
    const atEnd = await b.post('/api/bookings', { equipmentId: byCode('F-06').id, startsAt: endsAt, endsAt: at(76) });
    expect(atEnd.status).toBe(409);
    expect(atEnd.body.detail).toMatch(/cleaning/);
    const withinBuffer = await b.post('/api/bookings', { equipmentId: byCode('F-06').id, startsAt: plusHours(endsAt, 23), endsAt: at(76) });
    expect(withinBuffer.status).toBe(409);
    // The same buffer applies before a later booking: this one's own buffer would run into it.
    const before = await b.post('/api/bookings', { equipmentId: byCode('F-06').id, startsAt: at(58), endsAt: plusHours(at(62), -12) });
    expect(before.status).toBe(409);
    const afterBuffer = await b.post('/api/bookings', { equipmentId: byCode('F-06').id, startsAt: plusHours(endsAt, 24), endsAt: at(76) });
    expect(afterBuffer.status).toBe(201);
  });

  it('lets exactly one of 40 simultaneous requests for one slot through: one 201 and 39 409s', async () => {
    const emails = await quietMembers(4);
    const clients = await Promise.all(emails.map((e) => ctx.signIn(e)));
    const body = { equipmentId: byCode('F-08').id, startsAt: at(80), endsAt: at(88) };
    const results = await Promise.all(Array.from({ length: 40 }, (_, i) => clients[i % clients.length]!.post('/api/bookings', body)));
    const statuses = results.map((r) => r.status).sort();
    expect(statuses.filter((s) => s === 201)).toHaveLength(1);
    expect(statuses.filter((s) => s === 409)).toHaveLength(39);
    for (const r of results.filter((x) => x.status === 409)) expect(r.body.clash.code).toBe('F-08');
    const live = await ctx.db
      .selectFrom('booking')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('equipment_id', '=', body.equipmentId)
      .where('starts_at', '=', new Date(body.startsAt))
      .where('state', '<>', 'cancelled')
      .executeTakeFirstOrThrow();
    expect(live.n).toBe(1);
  });

  it('is guaranteed by the database: an overlapping insert that skips the service fails with 23P01', async () => {
    const owner = await ctx.db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
    const row = {
      equipment_id: byCode('F-09').id,
      owner_id: owner.id,
      starts_at: new Date(at(63)),
      ends_at: new Date(at(66)),
      blocked_until: new Date(at(67)),
    };
    await ctx.db.insertInto('booking').values(row).execute();
    await expect(
      ctx.db
        .insertInto('booking')
        .values({ ...row, starts_at: new Date(at(65)), ends_at: new Date(at(68)), blocked_until: new Date(at(69)) })
        .execute(),
    ).rejects.toMatchObject({ code: '23P01' });
  });
});

describe('validation and unknown items', () => {
  it('answers an unknown equipment id with 404', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.post('/api/bookings', { equipmentId: '00000000-0000-4000-8000-000000000000', startsAt: at(60), endsAt: at(62) });
    expect(res.status).toBe(404);
    expect(res.body).toMatchObject({ status: 404, title: 'Not found', detail: 'Equipment not found.' });
  });

  it('answers an end before the start with 422 on endsAt', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.post('/api/bookings', { equipmentId: byCode('F-10').id, startsAt: at(62), endsAt: at(60) });
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.body.errors).toEqual([{ path: 'endsAt', message: 'The end must be after the start' }]);
  });

  it('answers missing fields and times without offsets with 422', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.post('/api/bookings', { equipmentId: byCode('F-10').id, startsAt: '2027-01-10T10:00' });
    expect(res.status).toBe(422);
    expect(res.body.errors.map((e: { path: string }) => e.path).sort()).toEqual(['endsAt', 'startsAt']);
  });

  it('refuses to book an item that is out of service', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.post('/api/bookings', { equipmentId: byCode('F-05').id, startsAt: at(60), endsAt: at(62) });
    expect(res.status).toBe(409);
    expect(res.body.detail).toMatch(/F-05 is out of service/);
  });
});

describe('co-op rules', () => {
  it('refuses a booking longer than the longest allowed for its kind, with 422 naming the rule', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.post('/api/bookings', { equipmentId: byCode('F-10').id, startsAt: at(40), endsAt: at(76) });
    expect(res.status).toBe(422);
    expect(res.body).toMatchObject({ rule: 'maxDays', title: 'Booking rule: Longest booking' });
    expect(res.body.detail).toMatch(/at most 35 days/);
    expect(res.body.errors[0].path).toBe('endsAt');
  });

  it('refuses a booking too far ahead, and one in the past', async () => {
    const member = await ctx.signIn('member@example.org');
    const far = await member.post('/api/bookings', { equipmentId: byCode('F-10').id, startsAt: at(95), endsAt: at(100) });
    expect(far.status).toBe(422);
    expect(far.body.rule).toBe('maxAdvanceDays');
    expect(far.body.detail).toMatch(/90 days ahead/);
    const past = await member.post('/api/bookings', { equipmentId: byCode('F-10').id, startsAt: at(-2), endsAt: at(3) });
    expect(past.status).toBe(422);
    expect(past.body.rule).toBe('notInPast');
  });

  it('uses the rules the admin saves in Settings: bookings at once per member, and the cleaning buffer', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const current = await admin.get('/api/settings/booking_rules');
    expect(current.status).toBe(200);
    // The co-op's own limit (as the demo sets it, db/seeds/0003_bookings.ts; the test fixture keeps it).
    expect(current.body.value).toMatchObject({ cleaningBufferHours: 24, maxAdvanceDays: 90, maxActiveBookingsPerMember: 24 });

    // A member with one booking in use and one finished: only the first counts against the limit.
    const [email] = await quietMembers(1);
    const member = await ctx.signIn(email!);
    const now = ctx.clock.now();
    await createBooking(ctx.db, { ownerId: member.user.id, equipmentId: byCode('F-09').id, startsAt: at(-3), endsAt: at(4), now });
    await createBooking(ctx.db, { ownerId: member.user.id, equipmentId: byCode('F-10').id, startsAt: at(-20), endsAt: at(-10), now });
    const active = 1;
    const saved = await admin.put('/api/settings/booking_rules', { ...current.body.value, maxActiveBookingsPerMember: active + 1, cleaningBufferHours: 48 });
    expect(saved.status).toBe(200);
    expect(saved.body.value.maxActiveBookingsPerMember).toBe(active + 1);
    expect(saved.body.updatedBy).toMatchObject({ name: admin.user.name });

    const ok = await member.post('/api/bookings', { equipmentId: kegs[0]!.id, startsAt: at(50), endsAt: at(60) });
    expect(ok.status).toBe(201);
    expect(ok.body.booking.blockedUntil).toBe(plusHours(at(60), 48));
    const tooMany = await member.post('/api/bookings', { equipmentId: kegs[1]!.id, startsAt: at(50), endsAt: at(60) });
    expect(tooMany.status).toBe(422);
    expect(tooMany.body.rule).toBe('maxActiveBookingsPerMember');
    expect(tooMany.body.detail).toMatch(/at most \d+ booking/);

    // Rules are checked by their schema, and only the admin changes them.
    expect((await admin.put('/api/settings/booking_rules', { ...current.body.value, cleaningBufferHours: -1 })).status).toBe(422);
    const brewer = await ctx.signIn('brewer@example.org');
    expect((await brewer.get('/api/settings/booking_rules')).status).toBe(200);
    expect((await brewer.put('/api/settings/booking_rules', current.body.value)).status).toBe(403);
    expect((await member.get('/api/settings')).status).toBe(403);
    expect((await member.get('/api/bookings/rules')).body.rules.cleaningBufferHours).toBe(48);

    expect((await admin.put('/api/settings/booking_rules', current.body.value)).status).toBe(200);
  });
});

describe('who sees and does what', () => {
  let mine: { id: string };
  let theirs: { id: string };
  let owner: ApiClient;
  let other: ApiClient;

  beforeAll(async () => {
    owner = await ctx.signIn((await createMember(ctx.db, { email: 'member11@example.org' })).email);
    other = await ctx.signIn((await createMember(ctx.db, { email: 'member12@example.org' })).email);
    mine = (await owner.post('/api/bookings', { equipmentId: byCode('F-11').id, startsAt: at(61), endsAt: at(80) })).body.booking;
    theirs = (await other.post('/api/bookings', { equipmentId: byCode('F-12').id, startsAt: at(61), endsAt: at(80) })).body.booking;
    expect(mine?.id && theirs?.id).toBeTruthy();
  });

  it("shows members the whole calendar, others' bookings only as taken (no owner, e-mail or notes)", async () => {
    const res = await owner.get(`/api/bookings?from=${encodeURIComponent(at(55))}&to=${encodeURIComponent(at(90))}&kind=fermenter`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ page: 1, pageSize: 50 });
    expect(res.body.total).toBeGreaterThanOrEqual(2);
    const own = res.body.items.find((b: { id: string }) => b.id === mine.id);
    const notMine = res.body.items.find((b: { id: string }) => b.id === theirs.id);
    expect(own).toMatchObject({ mine: true, ownerId: owner.user.id, owner: { email: 'member11@example.org' } });
    expect(notMine).toMatchObject({ mine: false, equipment: { code: 'F-12' }, state: 'booked' });
    for (const b of res.body.items.filter((x: { mine: boolean }) => !x.mine)) {
      expect(b).not.toHaveProperty('owner');
      expect(b).not.toHaveProperty('ownerId');
      expect(b).not.toHaveProperty('notes');
    }
    expect(JSON.stringify(res.body)).not.toContain('member12@example.org');
    expect(JSON.stringify(res.body)).not.toContain(other.user.name);
    const one = await owner.get(`/api/bookings/${theirs.id}`);
    expect(one.status).toBe(200);
    expect(one.body.booking).not.toHaveProperty('owner');
    // Nor may a member filter by someone else to find out whose bookings they are.
    expect((await owner.get(`/api/bookings?ownerId=${other.user.id}`)).status).toBe(403);
  });

  it('shows the brewer on duty and the admin every owner', async () => {
    for (const email of ['brewer@example.org', 'admin@example.org']) {
      const api = await ctx.signIn(email);
      const res = await api.get(`/api/bookings/${theirs.id}`);
      expect(res.body.booking.owner).toMatchObject({ email: 'member12@example.org', name: other.user.name });
    }
  });

  it("lists only one's own bookings with mine=1, sorted and paged on the server", async () => {
    const res = await owner.get('/api/bookings?mine=1&sort=startsAt&order=desc&pageSize=2&includeCancelled=true');
    expect(res.status).toBe(200);
    expect(res.body.pageSize).toBe(2);
    expect(res.body.items.length).toBeLessThanOrEqual(2);
    expect(res.body.items.every((b: { mine: boolean }) => b.mine)).toBe(true);
    const all = await owner.get('/api/bookings?mine=1&pageSize=100&includeCancelled=true');
    expect(res.body.total).toBe(all.body.total);
    const starts = res.body.items.map((b: { startsAt: string }) => b.startsAt);
    expect([...starts].sort().reverse()).toEqual(starts);
    expect(res.body.items[0].id).toBe(mine.id);
  });

  it("does not let a member cancel another member's booking, nor book for someone else", async () => {
    const cancel = await owner.delete(`/api/bookings/${theirs.id}`);
    expect(cancel.status).toBe(403);
    const still = await ctx.db.selectFrom('booking').select('state').where('id', '=', theirs.id).executeTakeFirstOrThrow();
    expect(still.state).toBe('booked');
    const forOther = await owner.post('/api/bookings', { equipmentId: byCode('F-01').id, startsAt: at(60), endsAt: at(62), ownerId: other.user.id });
    expect(forOther.status).toBe(403);
    // The brewer on duty sees all bookings but books none (without the member role).
    const brewer = await ctx.signIn('brewer@example.org');
    expect((await brewer.post('/api/bookings', { equipmentId: byCode('F-01').id, startsAt: at(60), endsAt: at(62) })).status).toBe(403);
    expect((await request(ctx.app).get('/api/bookings')).status).toBe(401);
  });

  it('lets the owner cancel (204): the state is cancelled, the slot is free again and a notice is e-mailed', async () => {
    const res = await owner.delete(`/api/bookings/${mine.id}`);
    expect(res.status).toBe(204);
    const row = await ctx.db.selectFrom('booking').selectAll().where('id', '=', mine.id).executeTakeFirstOrThrow();
    expect(row.state).toBe('cancelled');
    expect(row.cancelled_by).toBe(owner.user.id);
    expect((await owner.delete(`/api/bookings/${mine.id}`)).status).toBe(409);
    const again = await other.post('/api/bookings', { equipmentId: byCode('F-11').id, startsAt: at(61), endsAt: at(80) });
    expect(again.status).toBe(201);
    const mail = await ctx.waitForMail('member11@example.org', /^Cancelled: F-11/);
    const parsed = await simpleParser(mail.raw);
    const cal = parseIcs(parsed.attachments.find((a) => a.filename?.endsWith('.ics'))!.content.toString('utf8'));
    expect(cal.get('METHOD')?.value).toBe('CANCEL');
    expect(cal.components[0]!.get('UID')?.value).toBe(`booking-${mine.id}@cellarwright.example.org`);
    expect(cal.components[0]!.get('STATUS')?.value).toBe('CANCELLED');
  });

  it("lets the admin book for a member and cancel anyone's booking; the member gets the e-mails", async () => {
    const admin = await ctx.signIn('admin@example.org');
    const made = await admin.post('/api/bookings', { equipmentId: byCode('F-07').id, startsAt: at(62), endsAt: at(70), ownerId: owner.user.id });
    expect(made.status).toBe(201);
    expect(made.body.booking.owner.email).toBe('member11@example.org');
    const mail = await ctx.waitForMail('member11@example.org', /^Booked: F-07/);
    expect(mail.text_body).toContain(`${admin.user.name} has booked`);
    expect((await admin.delete(`/api/bookings/${theirs.id}`)).status).toBe(204);
    const notice = await ctx.waitForMail('member12@example.org', /^Cancelled: F-12/);
    expect(notice.text_body).toContain(`cancelled by ${admin.user.name}`);
  });
});

describe('bookings move with the clock', () => {
  it('turns booked into in use at the start and finished at the end', async () => {
    const { advanceBookingStates } = await import('../../backend/modules/bookings/bookings.service.ts');
    const member = await ctx.signIn((await createMember(ctx.db)).email);
    const b = (await member.post('/api/bookings', { equipmentId: byCode('F-02').id, startsAt: at(64), endsAt: at(66) })).body.booking;
    await advanceBookingStates(ctx.db, new Date(at(65)));
    expect((await member.get(`/api/bookings/${b.id}`)).body.booking.state).toBe('in_use');
    await advanceBookingStates(ctx.db, new Date(at(66, 11)));
    expect((await member.get(`/api/bookings/${b.id}`)).body.booking.state).toBe('finished');
    expect((await member.delete(`/api/bookings/${b.id}`)).status).toBe(409);
  });
});

describe('settings are stamped by the clock', () => {
  it('a saved section carries the clock’s time, whatever the real date', async () => {
    const admin = await ctx.signIn('admin@example.org');
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const current = await admin.get('/api/settings/booking_rules');
      const saved = await admin.put('/api/settings/booking_rules', current.body.value);
      expect(saved.status).toBe(200);
      expect(saved.body).toMatchObject({ updatedAt: FAR_AHEAD, updatedBy: { id: admin.user.id } });
      expect((await admin.get('/api/settings/booking_rules')).body.updatedAt).toBe(FAR_AHEAD);
    });
  });
});
