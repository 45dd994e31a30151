import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { auditQuerySchema } from '../../../shared/schemas/audit.ts';
import type { Deps } from '../../lib/deps.ts';
import { requireUser } from '../../middleware/authenticate.ts';
import { listAudit } from './audit.service.ts';

/** The audit trail: who changed what, newest first unless an order is asked for. */
export function auditRoutes({ db }: Deps): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'AuditLog');
    const q = auditQuerySchema.parse(req.query);
    res.json(await listAudit(db, q, req.query.order ? q.order : 'desc'));
  });
  return router;
}
