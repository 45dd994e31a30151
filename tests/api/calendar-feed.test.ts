import ICAL from 'ical.js';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { createBooking, createFermenter, createInvoice, createKeg, createKegCheckout, createMember, DAY, setSetting } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { FAR_AHEAD, laterBy, withClockAt } from '../helpers/time.ts';

// Private calendar feeds: a member's bookings and due dates, the rota's hand-overs and due dates,
// read by an iCalendar parser the way a calendar program would, with no session.

let ctx: TestContext;
let ann: ApiClient, ben: ApiClient, brewer: ApiClient;

interface FeedEvent {
  uid: string;
  summary: string;
  start: Date;
  end: Date;
  allDay: boolean;
  utc: boolean;
}

/** Fetches a feed by its URL without any cookie, as a calendar program does. */
function fetchFeed(url: string) {
  const path = new URL(url).pathname;
  return request(ctx.app).get(path);
}

function parseFeed(text: string): { calendar: ICAL.Component; events: FeedEvent[] } {
  const calendar = new ICAL.Component(ICAL.parse(text));
  const events = calendar.getAllSubcomponents('vevent').map((v) => {
    const e = new ICAL.Event(v);
    return {
      uid: e.uid,
      summary: e.summary,
      start: e.startDate.toJSDate(),
      end: e.endDate.toJSDate(),
      allDay: e.startDate.isDate,
      utc: e.startDate.isDate || e.startDate.zone === ICAL.Timezone.utcTimezone,
    };
  });
  return { calendar, events };
}

async function feedEvents(url: string) {
  const res = await fetchFeed(url);
  expect(res.status).toBe(200);
  expect(res.headers['content-type']).toMatch(/^text\/calendar/);
  expect(res.headers['set-cookie']).toBeUndefined();
  return parseFeed(res.text);
}

const at = (days: number, hour = 10) => {
  const d = new Date(ctx.clock.now().getTime() + days * DAY);
  d.setUTCHours(hour, 0, 0, 0);
  return d;
};

useTestContext(async (created) => {
  ctx = created;
  await setSetting(ctx.db, 'booking_rules', { timeZone: 'Europe/London' });
  const [a, b] = [await createMember(ctx.db, { name: 'Ann Almanac' }), await createMember(ctx.db, { name: 'Ben Busy' })];
  [ann, ben, brewer] = await Promise.all([ctx.signIn(a.email), ctx.signIn(b.email), ctx.signIn('brewer@example.org')]);
});

describe('a member’s calendar feed', () => {
  it('gives a private link whose feed holds the member’s bookings and due dates, not others’, and drops a cancelled booking', async () => {
    const none = await ann.get('/api/calendar-feeds');
    expect(none.status).toBe(200);
    expect(none.body.feeds).toEqual([{ kind: 'member', url: null, createdAt: null }]);
    const made = await ann.post('/api/calendar-feeds', {});
    expect(made.status).toBe(201);
    const url: string = made.body.feed.url;
    expect(url).toMatch(/\/ical\/[A-Za-z0-9_-]{40,}\.ics$/);
    expect((await ann.get('/api/calendar-feeds')).body.feeds).toEqual([{ kind: 'member', url, createdAt: made.body.feed.createdAt }]);
    // Only a hash of the token is stored.
    const token = /\/ical\/([^.]+)\.ics$/.exec(url)![1]!;
    const stored = await ctx.db.selectFrom('calendar_feed').select('token_hash').where('owner_id', '=', ann.user.id).execute();
    expect(stored).toHaveLength(1);
    expect(stored[0]!.token_hash).not.toContain(token);

    const f1 = await createFermenter(ctx.db);
    const f2 = await createFermenter(ctx.db);
    const kept = await createBooking(ctx.db, { ownerId: ann.user.id, equipmentId: f1.id, startsAt: at(3), endsAt: at(10), now: ctx.clock.now() });
    const dropped = await createBooking(ctx.db, { ownerId: ann.user.id, equipmentId: f2.id, startsAt: at(5), endsAt: at(8), now: ctx.clock.now() });
    const bens = await createBooking(ctx.db, { ownerId: ben.user.id, equipmentId: f2.id, startsAt: at(12), endsAt: at(15), now: ctx.clock.now() });
    const keg = await createKeg(ctx.db);
    await createKegCheckout(ctx.db, { kegId: keg.id, memberId: ann.user.id, at: at(-1), dueAt: at(6, 18) });
    const invoice = await createInvoice(ctx.db, { memberId: ann.user.id, period: '2026-11', today: '2026-12-01' });

    const before = await feedEvents(url);
    expect(before.events.map((e) => e.uid)).toEqual(
      expect.arrayContaining([`booking-${kept.id}@cellarwright.example.org`, `booking-${dropped.id}@cellarwright.example.org`]),
    );
    expect((await ann.delete(`/api/bookings/${dropped.id}`)).status).toBe(204);

    const { calendar, events } = await feedEvents(url);
    expect(calendar.getFirstPropertyValue('x-wr-timezone')).toBe('Europe/London');
    const uids = events.map((e) => e.uid);
    expect(uids).toContain(`booking-${kept.id}@cellarwright.example.org`);
    expect(uids).not.toContain(`booking-${dropped.id}@cellarwright.example.org`);
    expect(uids).not.toContain(`booking-${bens.id}@cellarwright.example.org`);
    const booking = events.find((e) => e.uid === `booking-${kept.id}@cellarwright.example.org`)!;
    expect(booking).toMatchObject({ start: at(3), end: at(10), utc: true, allDay: false });
    expect(booking.summary).toContain(f1.code);
    const kegDue = events.find((e) => e.uid.startsWith(`keg-due-${keg.id}`))!;
    expect(kegDue).toMatchObject({ start: at(6, 18), utc: true });
    expect(kegDue.summary).toContain(keg.code);
    const invoiceDue = events.find((e) => e.uid === `invoice-due-${invoice.id}@cellarwright.example.org`)!;
    expect(invoiceDue.allDay).toBe(true);
    expect(invoiceDue.summary).toContain(invoice.number!);
    expect(ICAL.Time.fromJSDate(invoiceDue.start, true).toString().slice(0, 10)).toBe(invoice.due_on);
    // Every timed event is in UTC.
    expect(events.every((e) => e.utc)).toBe(true);
  });

  it('revokes the old link when a new one is made: the old one is 404, the new one works', async () => {
    const first = (await ann.get('/api/calendar-feeds')).body.feeds[0].url as string;
    expect((await fetchFeed(first)).status).toBe(200);
    const renewed = await ann.post('/api/calendar-feeds', { kind: 'member' });
    expect(renewed.status).toBe(201);
    expect(renewed.body.feed.url).not.toBe(first);
    const old = await fetchFeed(first);
    expect(old.status).toBe(404);
    expect(old.headers['content-type']).toMatch(/application\/problem\+json/);
    expect((await fetchFeed(renewed.body.feed.url)).status).toBe(200);
    const rows = await ctx.db.selectFrom('calendar_feed').select(['revoked_at']).where('owner_id', '=', ann.user.id).execute();
    expect(rows.filter((r) => r.revoked_at === null)).toHaveLength(1);
    expect(rows).toHaveLength(2);
  });

  it('gives another member’s link only that member’s events', async () => {
    const url = (await ben.post('/api/calendar-feeds', {})).body.feed.url as string;
    const { events } = await feedEvents(url);
    const bookingUids = events.filter((e) => e.uid.startsWith('booking-')).map((e) => e.uid);
    const bens = await ctx.db.selectFrom('booking').select('id').where('owner_id', '=', ben.user.id).where('state', '<>', 'cancelled').execute();
    expect(bookingUids.sort()).toEqual(bens.map((b) => `booking-${b.id}@cellarwright.example.org`).sort());
    expect(events.some((e) => e.uid.startsWith('keg-due-') || e.uid.startsWith('invoice-due-'))).toBe(false);
  });

  it('answers 404 for unknown, malformed and missing tokens, and never needs a session', async () => {
    for (const path of ['/ical/not-a-token.ics', `/ical/${'A'.repeat(43)}.ics`, '/ical/x', '/ical/..%2F..%2Fetc%2Fpasswd.ics']) {
      const res = await request(ctx.app).get(path);
      expect(res.status, path).toBe(404);
    }
  });
});

describe('the rota’s feed', () => {
  it('is for the rota only: a member may not make one, the treasurer has none', async () => {
    expect((await ann.post('/api/calendar-feeds', { kind: 'rota' })).status).toBe(403);
    const treasurer = await ctx.signIn('treasurer@example.org');
    expect((await treasurer.get('/api/calendar-feeds')).body.feeds).toEqual([]);
    expect((await treasurer.post('/api/calendar-feeds', {})).status).toBe(403);
    expect((await ann.post('/api/calendar-feeds', { kind: 'other' })).status).toBe(422);
  });

  it('holds every member’s live bookings with their cleaning time, and kegs due back', async () => {
    const list = await brewer.get('/api/calendar-feeds');
    expect(list.body.feeds.map((f: { kind: string }) => f.kind)).toEqual(['member', 'rota']);
    const made = await brewer.post('/api/calendar-feeds', { kind: 'rota' });
    expect(made.status).toBe(201);
    const { events } = await feedEvents(made.body.feed.url);
    const live = await ctx.db
      .selectFrom('booking')
      .select(['id', 'starts_at', 'ends_at', 'blocked_until', 'state'])
      .where('owner_id', 'in', [ann.user.id, ben.user.id])
      .execute();
    for (const b of live) {
      const e = events.find((x) => x.uid === `booking-${b.id}@cellarwright.example.org`);
      if (b.state === 'cancelled') expect(e, 'a cancelled booking is not in the feed').toBeUndefined();
      else {
        expect(e).toMatchObject({ start: b.starts_at, end: b.ends_at });
        const cleaning = events.find((x) => x.uid === `cleaning-${b.id}@cellarwright.example.org`);
        expect(cleaning).toMatchObject({ start: b.ends_at, end: b.blocked_until });
      }
    }
    expect(events.some((e) => e.uid.startsWith('keg-due-') && /Ann Almanac/.test(e.summary))).toBe(true);
    // The member feed's invoices are the member's business, not the rota's.
    expect(events.some((e) => e.uid.startsWith('invoice-due-'))).toBe(false);
    // A brewer who leaves the rota loses the rota feed at once.
    await ctx.db
      .updateTable('app_user')
      .set({ roles: ['member'] })
      .where('id', '=', brewer.user.id)
      .execute();
    try {
      expect((await fetchFeed(made.body.feed.url)).status).toBe(404);
    } finally {
      await ctx.db
        .updateTable('app_user')
        .set({ roles: ['brewer_on_duty'] })
        .where('id', '=', brewer.user.id)
        .execute();
    }
    expect((await fetchFeed(made.body.feed.url)).status).toBe(200);
  });
});

describe('feed links follow the clock', () => {
  it('a new link is made, and the old one revoked, at the clock’s time, whatever the real date', async () => {
    const owner = await ctx.signIn((await createMember(ctx.db)).email);
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const first = await owner.post('/api/calendar-feeds', { kind: 'member' });
      expect(first.body.feed.createdAt).toBe(FAR_AHEAD);
      const later = laterBy(FAR_AHEAD, DAY);
      ctx.clock.freeze(later);
      expect((await owner.post('/api/calendar-feeds', { kind: 'member' })).body.feed.createdAt).toBe(later);
      const rows = await ctx.db
        .selectFrom('calendar_feed')
        .select(['created_at', 'revoked_at'])
        .where('owner_id', '=', owner.user.id)
        .orderBy('created_at')
        .execute();
      expect(rows).toEqual([
        { created_at: new Date(FAR_AHEAD), revoked_at: new Date(later) },
        { created_at: new Date(later), revoked_at: null },
      ]);
    });
  });
});
