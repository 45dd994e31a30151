import type { Database } from '../../backend/db/database.ts';
import { toDate, type At } from './common.ts';

export interface AuditEntryOverrides {
  at: At;
  action?: string;
  subjectType?: string;
  subjectId?: string | null;
  actorId?: string | null;
  detail?: Record<string, unknown>;
}

/** One audit trail row at `at`, as `audit()` (backend/lib/audit.ts) writes it inside a change. */
export async function createAuditEntry(db: Database, o: AuditEntryOverrides) {
  return db
    .insertInto('audit_log')
    .values({
      actor_id: o.actorId ?? null,
      action: o.action ?? 'updated',
      subject_type: o.subjectType ?? 'Batch',
      subject_id: o.subjectId ?? null,
      detail: JSON.stringify(o.detail ?? {}),
      at: toDate(o.at, 'at'),
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}
