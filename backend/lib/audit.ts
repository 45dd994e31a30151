import type { Database } from '../db/database.ts';

/** The audit trail: who changed what. Call inside the transaction that made the change. */
export async function audit(
  db: Database,
  actorId: string | null,
  action: string,
  subjectType: string,
  subjectId: string | null,
  detail: Record<string, unknown> = {},
): Promise<void> {
  await db
    .insertInto('audit_log')
    .values({ actor_id: actorId, action, subject_type: subjectType, subject_id: subjectId, detail: JSON.stringify(detail) })
    .execute();
}
