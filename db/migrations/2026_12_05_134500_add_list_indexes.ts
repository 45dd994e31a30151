import { type Kysely, sql } from 'kysely';

/**
 * Indexes for the lists the screens page through, found with EXPLAIN (ANALYZE, BUFFERS) on the
 * benchmark data set (five years of a large co-op): each matches a list's default order (direction and
 * nulls included, with its tie-breaker) or its filter, so a page reads its rows instead of sorting the table.
 */
const indexes: [name: string, definition: string][] = [
  // The audit trail, newest first; filtered by subject type or by who acted (also the actor's foreign key).
  ['audit_log_at_id_idx', 'audit_log (at desc nulls last, id desc)'],
  ['audit_log_subject_type_at_idx', 'audit_log (subject_type, at desc nulls last, id desc)'],
  ['audit_log_actor_at_idx', 'audit_log (actor_id, at desc nulls last, id desc)'],
  // Bookings overlapping a window (`ends_at > from and starts_at < to`): those ending after its start.
  ['booking_ends_at_idx', 'booking (ends_at)'],
  // Sanitation cycles, newest first; a vessel's fresh cycles (the effective state of every vessel in a list).
  ['sanitation_cycle_completed_id_idx', 'sanitation_cycle (completed_at desc nulls last, id)'],
  ['sanitation_cycle_fresh_idx', 'sanitation_cycle (equipment_id, fresh_until) where complete'],
  // Invoices and batches in the order they were made.
  ['invoice_created_at_id_idx', 'invoice (created_at, id)'],
  ['batch_created_at_id_idx', 'batch (created_at, id)'],
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const [name, definition] of indexes) await sql.raw(`create index ${name} on ${definition}`).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const [name] of indexes) await sql.raw(`drop index if exists ${name}`).execute(db);
}
