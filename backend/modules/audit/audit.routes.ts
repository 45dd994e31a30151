import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { z } from 'zod';
import { sortableListQuerySchema } from '../../../shared/schemas/pagination.ts';
import type { Deps } from '../../lib/deps.ts';
import { requireUser } from '../../middleware/authenticate.ts';

const auditQuerySchema = sortableListQuerySchema(['at', 'action'] as const, 'at').extend({
  subjectType: z.string().max(40).optional(),
  subjectId: z.string().max(80).optional(),
  actorId: z.uuid().optional(),
});

/** The audit trail: who changed what, newest first. */
export function auditRoutes({ db }: Deps): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'AuditLog');
    const q = auditQuerySchema.parse(req.query);
    let base = db.selectFrom('audit_log').leftJoin('app_user', 'app_user.id', 'audit_log.actor_id');
    if (q.subjectType) base = base.where('audit_log.subject_type', '=', q.subjectType);
    if (q.subjectId) base = base.where('audit_log.subject_id', '=', q.subjectId);
    if (q.actorId) base = base.where('audit_log.actor_id', '=', q.actorId);
    const sortCol = q.sort === 'action' ? 'audit_log.action' : 'audit_log.at';
    const [{ total }, rows] = await Promise.all([
      base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
      base
        .select(['audit_log.id', 'audit_log.action', 'audit_log.subject_type', 'audit_log.subject_id', 'audit_log.detail', 'audit_log.at', 'app_user.name as actor_name'])
        .orderBy(sortCol, req.query.order ? q.order : 'desc')
        .orderBy('audit_log.id', 'desc')
        .limit(q.pageSize)
        .offset((q.page - 1) * q.pageSize)
        .execute(),
    ]);
    res.json({
      items: rows.map((r) => ({ id: String(r.id), action: r.action, subjectType: r.subject_type, subjectId: r.subject_id, detail: r.detail, at: r.at.toISOString(), actorName: r.actor_name })),
      total,
      page: q.page,
      pageSize: q.pageSize,
    });
  });
  return router;
}
