import { createHash, createHmac, randomUUID } from 'node:crypto';
import ical, { ICalCalendarMethod, ICalEventStatus } from 'ical-generator';
import { longDate } from '../../../shared/billing/dates.ts';
import { formatMoney } from '../../../shared/billing/money.ts';
import { defineAbilityFor, subject } from '../../../shared/permissions/ability.ts';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import type { CalendarFeedKind } from '../../db/tables/reminders.ts';
import { audit } from '../../lib/audit.ts';
import { bookingUid } from '../bookings/bookings.mail.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { feedBookings, feedByTokenHash, feedInvoicesDue, feedKegsDue, insertFeed, liveFeeds, lockFeedOwner, revokeFeeds } from './calendar-feed.repository.ts';

export const calendarFeedKinds: CalendarFeedKind[] = ['member', 'rota'];
const HOUR = 3600_000;
const DAY = 24 * HOUR;
/** What a feed holds: from a month back to a year ahead of the clock's now. */
const FEED_PAST_MS = 31 * DAY;
const FEED_AHEAD_MS = 366 * DAY;

/**
 * A feed's secret token: unguessable without the server's secret (an HMAC of the feed's random id),
 * so the link can be shown again on the profile while the database keeps only its SHA-256.
 */
export function feedToken(config: Config, feedId: string): string {
  return createHmac('sha256', config.sessionSecret).update(`calendar-feed:${feedId}`).digest('base64url');
}
export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');
export const feedUrl = (config: Config, token: string) => `${config.publicUrl}/ical/${token}.ics`;

export interface CalendarFeedView {
  kind: CalendarFeedKind;
  url: string | null;
  createdAt: string | null;
}

/** The person's live feeds of the kinds asked for (a kind without a link yet has `url: null`). */
export async function listFeeds(db: Database, config: Config, ownerId: string, kinds: CalendarFeedKind[]): Promise<CalendarFeedView[]> {
  if (kinds.length === 0) return [];
  const rows = await liveFeeds(db, ownerId, kinds);
  return kinds.map((kind) => {
    const row = rows.find((r) => r.kind === kind);
    return { kind, url: row ? feedUrl(config, feedToken(config, row.id)) : null, createdAt: row ? row.created_at.toISOString() : null };
  });
}

/** A new link for the person's feed of this kind; the old link (if any) stops working at once. */
export async function renewFeed(db: Database, config: Config, ownerId: string, kind: CalendarFeedKind, now: Date): Promise<CalendarFeedView> {
  return db.transaction().execute(async (trx) => {
    // One renewal at a time per person and kind: the row lock on the account serialises them.
    await lockFeedOwner(trx, ownerId);
    const revoked = await revokeFeeds(trx, ownerId, kind, now);
    const id = randomUUID();
    const token = feedToken(config, id);
    const createdAt = await insertFeed(trx, { id, owner_id: ownerId, kind, token_hash: hashToken(token), created_at: now });
    await audit(trx, ownerId, revoked ? 'calendar_feed_renewed' : 'calendar_feed_created', 'CalendarFeed', id, { kind });
    return { kind, url: feedUrl(config, token), createdAt: createdAt.toISOString() };
  });
}

/**
 * The live feed a token names, if its owner is active and may still read it (a brewer taken off the
 * rota loses the rota feed); anything else is treated as no feed at all.
 */
export async function feedForToken(db: Database, token: string) {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return undefined;
  const row = await feedByTokenHash(db, hashToken(token));
  if (!row || !row.is_active) return undefined;
  const ability = defineAbilityFor({ id: row.owner_id, roles: row.roles });
  if (!ability.can('read', subject('CalendarFeed', { ownerId: row.owner_id, kind: row.kind }))) return undefined;
  return row;
}

function newCalendar(name: string, coop: string, timeZone: string) {
  const calendar = ical({
    name,
    prodId: { company: coop, product: 'Cellarwright', language: 'EN' },
    method: ICalCalendarMethod.PUBLISH,
    ttl: 3600,
  });
  // Times are written in UTC; the co-op's time zone is named for calendars that show it.
  calendar.x([{ key: 'X-WR-TIMEZONE', value: timeZone }]);
  calendar.description(`${name}. Times are in UTC; the co-op keeps ${timeZone} time.`);
  return calendar;
}

/**
 * The feed as an RFC 5545 calendar. A member's: their bookings, the kegs they have out (due back)
 * and their unpaid invoices (due day). The rota's: every booking (hand-over at its start, cleaning
 * between its end and the next user), transfers due out of fermenters, and kegs due back. Cancelled
 * bookings are left out, so a subscribed calendar drops them on its next refresh.
 */
export async function renderFeed(db: Database, config: Config, feed: { kind: CalendarFeedKind; owner_id: string; name: string }, now: Date): Promise<string> {
  const { coopName: coop, timeZone } = await coopProfile(db);
  const from = new Date(now.getTime() - FEED_PAST_MS);
  const to = new Date(now.getTime() + FEED_AHEAD_MS);
  const rota = feed.kind === 'rota';
  const calendar = newCalendar(rota ? `${coop}: cellar rota` : `${coop}: ${feed.name}`, coop, timeZone);
  const stamp = now;

  const scope = { from, to, ownerId: rota ? undefined : feed.owner_id };
  // Every event of the cellar is stamped with the feed's time and placed in the co-op's cellar.
  const event = (e: { id: string; start: Date; end: Date; summary: string; description: string; url: string; status?: ICalEventStatus }) =>
    calendar.createEvent({ stamp, location: `${coop} cellar`, ...e });

  for (const b of await feedBookings(db, scope)) {
    const url = `${config.publicUrl}/cellar/${b.equipment_id}`;
    const vessel = `${b.code} ${b.name}`;
    event({
      id: bookingUid(b.id),
      start: b.starts_at,
      end: b.ends_at,
      summary: rota ? `${vessel}: ${b.owner_name}` : `${vessel} booked`,
      description: `${b.code} (${b.name}) booked for ${b.owner_name}${b.batch_name ? `, batch ${b.batch_name}` : ''}. Hand-over at the start; kept free for cleaning until ${b.blocked_until.toISOString()}.`,
      url,
      status: ICalEventStatus.CONFIRMED,
    });
    if (rota && b.blocked_until.getTime() > b.ends_at.getTime() && (b.kind === 'fermenter' || b.kind === 'keg')) {
      const description = `${b.code} comes back from ${b.owner_name}'s booking: clean, rinse, sanitize and purge it before its next use.`;
      event({ id: `cleaning-${b.id}@cellarwright.example.org`, start: b.ends_at, end: b.blocked_until, summary: `Clean ${vessel}`, description, url });
    }
    if (rota && b.kind === 'fermenter' && (b.batch_status === 'fermenting' || b.batch_status === 'conditioning')) {
      const description = `${b.owner_name}'s batch ${b.batch_name} must be out of ${b.code} before its booking ends.`;
      const start = new Date(b.ends_at.getTime() - HOUR);
      event({
        id: `transfer-${b.id}@cellarwright.example.org`,
        start,
        end: b.ends_at,
        summary: `Transfer due: ${b.batch_name} out of ${b.code}`,
        description,
        url,
      });
    }
  }

  for (const k of await feedKegsDue(db, scope)) {
    const due = k.due_at!;
    const overdue = due.getTime() < now.getTime() ? ' (overdue)' : '';
    event({
      id: `keg-due-${k.id}-${k.checked_out_at ? k.checked_out_at.getTime() : 0}@cellarwright.example.org`,
      start: due,
      end: new Date(due.getTime() + HOUR / 2),
      summary: rota ? `Keg ${k.code} due back from ${k.member_name}${overdue}` : `Bring back keg ${k.code}${overdue}`,
      description: `Keg ${k.code} (${k.name}) is due back at the cellar. Release the pressure before you carry it, and keep it upright.`,
      url: `${config.publicUrl}/kegs/${k.id}`,
    });
  }

  if (!rota) {
    for (const inv of await feedInvoicesDue(db, feed.owner_id)) {
      const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
      const day = new Date(`${inv.due_on}T00:00:00Z`);
      calendar.createEvent({
        id: `invoice-due-${inv.id}@cellarwright.example.org`,
        stamp,
        allDay: true,
        start: day,
        end: new Date(day.getTime() + DAY),
        summary: `Invoice ${inv.number} due: ${formatMoney(due, inv.currency.trim(), 'en-GB')}`,
        description: `Invoice ${inv.number} is due on ${longDate(inv.due_on!)}. Pay it online: ${config.publicUrl}/billing/my-invoices/${inv.id}`,
        url: `${config.publicUrl}/billing/my-invoices/${inv.id}`,
      });
    }
  }
  return calendar.toString();
}
