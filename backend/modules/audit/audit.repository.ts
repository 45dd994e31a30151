import type { AuditQuery } from '../../../shared/schemas/audit.ts';
import type { Deps } from '../../lib/deps.ts';
import { keptCount, orderByAllowed, paginate } from '../../lib/paginate.ts';

const auditSort = {
  at: 'audit_log.at',
  action: 'audit_log.action',
  subjectType: 'audit_log.subject_type',
  actor: 'app_user.name',
} as const;

/** The total of a trail filtered by subject type alone, from the kept counts of audit rows by subject type. */
function keptAuditTotal(db: Deps['db'], q: AuditQuery) {
  if (q.subjectId || q.actorId || q.from || q.to) return undefined;
  return () => keptCount(db, 'audit_log', q.subjectType ? { in: [q.subjectType] } : {});
}

/** One page of audit rows with their actor's name, filtered by person, record and time, and the count of all. */
export async function auditPage(db: Deps['db'], q: AuditQuery, order: 'asc' | 'desc') {
  let base = db.selectFrom('audit_log').leftJoin('app_user', 'app_user.id', 'audit_log.actor_id');
  if (q.subjectType) base = base.where('audit_log.subject_type', '=', q.subjectType);
  if (q.subjectId) base = base.where('audit_log.subject_id', '=', q.subjectId);
  if (q.actorId) base = base.where('audit_log.actor_id', '=', q.actorId);
  if (q.from) base = base.where('audit_log.at', '>=', new Date(q.from));
  if (q.to) base = base.where('audit_log.at', '<', new Date(q.to));
  return paginate(
    base,
    (qb) =>
      orderByAllowed(
        qb.select([
          'audit_log.id',
          'audit_log.action',
          'audit_log.subject_type',
          'audit_log.subject_id',
          'audit_log.detail',
          'audit_log.at',
          'audit_log.actor_id',
          'app_user.name as actor_name',
        ]),
        auditSort,
        { sort: q.sort, order },
        'audit_log.id',
        order,
      ),
    q,
    keptAuditTotal(db, q),
  );
}
