import { sql } from 'kysely';
import { auditChanges, type AuditEntry, type AuditQuery } from '../../../shared/schemas/audit.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Deps } from '../../lib/deps.ts';

const auditSort = {
  at: sql.ref('audit_log.at'),
  action: sql.ref('audit_log.action'),
  subjectType: sql.ref('audit_log.subject_type'),
  actor: sql.ref('app_user.name'),
} as const;

/** One page of the audit trail, filtered by person, record and time, sorted and paged in SQL. */
export async function listAudit(db: Deps['db'], q: AuditQuery, order: 'asc' | 'desc'): Promise<Page<AuditEntry>> {
  let base = db.selectFrom('audit_log').leftJoin('app_user', 'app_user.id', 'audit_log.actor_id');
  if (q.subjectType) base = base.where('audit_log.subject_type', '=', q.subjectType);
  if (q.subjectId) base = base.where('audit_log.subject_id', '=', q.subjectId);
  if (q.actorId) base = base.where('audit_log.actor_id', '=', q.actorId);
  if (q.from) base = base.where('audit_log.at', '>=', new Date(q.from));
  if (q.to) base = base.where('audit_log.at', '<', new Date(q.to));
  const [{ total }, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
    base
      .select([
        'audit_log.id',
        'audit_log.action',
        'audit_log.subject_type',
        'audit_log.subject_id',
        'audit_log.detail',
        'audit_log.at',
        'audit_log.actor_id',
        'app_user.name as actor_name',
      ])
      .orderBy(sql`${auditSort[q.sort]} ${sql.raw(order)} nulls last`)
      .orderBy('audit_log.id', order)
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  return {
    items: rows.map((r) => ({
      id: String(r.id),
      action: r.action,
      subjectType: r.subject_type,
      subjectId: r.subject_id,
      detail: r.detail,
      at: r.at.toISOString(),
      actorId: r.actor_id,
      actorName: r.actor_name,
      changes: auditChanges(r.detail),
    })),
    total: Number(total),
    page: q.page,
    pageSize: q.pageSize,
  };
}
