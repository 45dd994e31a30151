import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { z } from 'zod';
import {
  continueSanitationCycleSchema,
  createSanitationCycleSchema,
  sanitationAuditQuerySchema,
  sanitationCycleListQuerySchema,
  sanitationStatusQuerySchema,
} from '../../../shared/schemas/sanitation.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { createHandler, listHandler, signedInRouter } from '../../lib/route-handlers.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { renderAuditPdfOffThread } from './audit-report.ts';
import { loadAuditData } from './audit-report-data.ts';
import { boundFrom, boundTo, continueCycle, cycleViews, listCycles, listVesselStatus, recordCycle, sanitationSettings } from './sanitation.service.ts';
import { getBookingRules } from '../settings/settings.service.ts';

/** `/api/sanitation-cycles`: the sanitation log. */
export function sanitationCycleRoutes({ db, clock }: Deps): Router {
  const router = signedInRouter({ id: 'Sanitation cycle' });
  const record = createHandler(createSanitationCycleSchema, 'SanitationCycle', (input, actor) => recordCycle(db, input, actor, clock.now()));
  router
    .route('/')
    .post(record)
    .get(listHandler(sanitationCycleListQuerySchema, 'SanitationCycle', (q) => listCycles(db, q)));

  router.get('/:id', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'SanitationCycle');
    const id = z.uuid().safeParse(req.params.id);
    if (!id.success) throw notFound('Sanitation cycle');
    const [cycle] = await cycleViews(db, [id.data]);
    if (!cycle) throw notFound('Sanitation cycle');
    res.json({ cycle });
  });

  router.post('/:id/steps', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'SanitationCycle');
    const id = z.uuid().safeParse(req.params.id);
    if (!id.success) throw notFound('Sanitation cycle');
    const input = continueSanitationCycleSchema.parse(req.body ?? {});
    res.json(await continueCycle(db, id.data, input, userOf(req), clock.now()));
  });

  return router;
}

/** `/api/sanitation-status`: every fermenter and keg with its sanitation standing now. */
export function sanitationStatusRoutes({ db, clock }: Deps): Router {
  const list = listHandler(sanitationStatusQuerySchema, 'SanitationCycle', (q) => listVesselStatus(db, q, clock.now()));
  return signedInRouter().get('/', list);
}

/** `GET /api/reports/sanitation-audit.pdf`: the audit report (mounted under /api/reports; other reports pass through). */
export function sanitationReportRoutes({ db, clock }: Deps): Router {
  const router = Router();
  router.get('/sanitation-audit.pdf', requireUser, async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'SanitationAudit');
    const q = sanitationAuditQuerySchema.parse(req.query);
    const settings = await sanitationSettings(db);
    const from = boundFrom(q.from);
    const to = boundTo(q.to);
    const { timeZone } = await getBookingRules(db);
    const data = await loadAuditData(db, { from, to, filter: { ids: q.equipmentId, kind: q.kind }, settings, now: clock.now(), timeZone });
    if (q.equipmentId?.length && data.vessels.length === 0) throw notFound('Vessel');
    const label = q.equipmentId?.length ? data.vessels.map((v) => v.code).join(', ') : q.kind ? `every ${q.kind}` : 'every fermenter and keg';
    // The two queries ran here; the layout runs on a PDF render thread.
    const pdf = await renderAuditPdfOffThread(data, label.length > 120 ? `${data.vessels.length} selected vessels` : label);
    const name = `sanitation-audit-${q.from.slice(0, 10)}-to-${q.to.slice(0, 10)}.pdf`;
    res.type('application/pdf').set('Content-Disposition', `inline; filename="${name}"`).set('Cache-Control', 'no-store').send(pdf);
  });
  return router;
}
