import type { Generated } from 'kysely';
import type { Timestamp } from './types.ts';

export type ReminderKind = 'invoice' | 'keg';

/** A reminder sent for an overdue invoice or an overdue keg; its target stays quiet until `quiet_until`. */
export interface ReminderTable {
  id: Generated<string>;
  kind: ReminderKind;
  invoice_id: string | null;
  keg_id: string | null;
  member_id: string;
  sent_to: string;
  sent_by: string | null;
  sent_at: Timestamp;
  quiet_until: Timestamp;
  created_at: Generated<Date>;
}

export type CalendarFeedKind = 'member' | 'rota';

/** A private calendar link: only the SHA-256 of its token is kept; a revoked one answers 404. */
export interface CalendarFeedTable {
  id: Generated<string>;
  owner_id: string;
  kind: CalendarFeedKind;
  token_hash: string;
  created_at: Generated<Date>;
  revoked_at: Timestamp | null;
}

export interface ReminderTables {
  reminder: ReminderTable;
  calendar_feed: CalendarFeedTable;
}
