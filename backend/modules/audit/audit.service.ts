import { auditChanges, type AuditEntry, type AuditQuery } from '../../../shared/schemas/audit.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Deps } from '../../lib/deps.ts';
import { pageOf } from '../../lib/paginate.ts';
import { auditPage } from './audit.repository.ts';

/** One page of the audit trail, filtered by person, record and time, sorted and paged in SQL. */
export async function listAudit(db: Deps['db'], q: AuditQuery, order: 'asc' | 'desc'): Promise<Page<AuditEntry>> {
  return pageOf(
    await auditPage(db, q, order),
    (r) => ({
      id: String(r.id),
      action: r.action,
      subjectType: r.subject_type,
      subjectId: r.subject_id,
      detail: r.detail,
      at: r.at.toISOString(),
      actorId: r.actor_id,
      actorName: r.actor_name,
      changes: auditChanges(r.detail),
    }),
    q,
  );
}
