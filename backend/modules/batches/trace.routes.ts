import { ForbiddenError } from '@casl/ability';
import { Router, type Request, type Response } from 'express';
import { subject } from '../../../shared/permissions/ability.ts';
import { traceReportQuerySchema, type BatchTrace } from '../../../shared/schemas/trace.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { defaultLocale, formatDate } from '../../../shared/format/index.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { findVisibleBatch } from './batches.service.ts';
import { batchTrace, traceCsv, tracePdf, traceReport, type TraceViewer } from './trace.service.ts';

const viewerOf = (req: Request): TraceViewer => ({
  id: userOf(req).id,
  mayNameHolder: (memberId) => memberId === userOf(req).id || req.ability.can('readOwner', subject('Keg', { memberId })),
});

const safeName = (s: string) =>
  s
    .replace(/[^A-Za-z0-9-]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60) || 'batch';

/**
 * `GET /api/batches/:id/trace` (and `.csv`, `.pdf`): every keg the batch went into and where each
 * is now. Whoever may read the batch (its owner, the rota, the treasurer, the admin) may trace it;
 * another member's batch is a 404. Added to the batches router, which checks the id.
 */
export function addBatchTraceRoutes(router: Router, { db, clock }: Pick<Deps, 'db' | 'clock'>): void {
  const load = async (req: Request): Promise<BatchTrace> => {
    const row = await findVisibleBatch(db, req.ability, req.params.id as string);
    ForbiddenError.from(req.ability).throwUnlessCan('read', subject('Batch', { ownerId: row.owner_id }));
    return batchTrace(db, row.id, viewerOf(req), clock.now());
  };
  router.get('/:id/trace', async (req, res) => {
    res.json(await load(req));
  });
  router.get('/:id/trace.csv', async (req, res) => {
    const trace = await load(req);
    res
      .type('text/csv; charset=utf-8')
      .attachment(`trace-${safeName(trace.batch.name)}.csv`)
      .send(traceCsv([trace]));
  });
  router.get('/:id/trace.pdf', async (req, res) => {
    const trace = await load(req);
    const now = clock.now();
    const coop = await coopProfile(db);
    const asOf = formatDate(now, { locale: defaultLocale, timeZone: coop.timeZone });
    const pdf = await tracePdf(`Trace: ${trace.batch.name}`, `Every keg the batch went into and where each is now, as of ${asOf}.`, [trace], now, coop);
    res
      .type('application/pdf')
      .set('Content-Disposition', `inline; filename="trace-${safeName(trace.batch.name)}.pdf"`)
      .set('Cache-Control', 'no-store')
      .send(pdf);
  });
}

/**
 * `GET /api/reports/trace?from&to&format=json|csv|pdf`: every keg filled in the range, by batch, and
 * where each is now (a recall in one place). A member sees only their own batches.
 */
export function traceReportRoutes({ db, clock }: Deps): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req: Request, res: Response) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Batch');
    const q = traceReportQuerySchema.parse(req.query);
    const ownerId = canAll(req.ability, 'read', 'Batch') ? undefined : userOf(req).id;
    const now = clock.now();
    const report = await traceReport(db, { from: q.from, to: q.to, ownerId }, viewerOf(req), now);
    const name = `trace-${q.from}-to-${q.to}`;
    if (q.format === 'csv') {
      res.type('text/csv; charset=utf-8').attachment(`${name}.csv`).send(traceCsv(report.batches));
    } else if (q.format === 'pdf') {
      const coop = await coopProfile(db);
      const ctx = { locale: defaultLocale, timeZone: coop.timeZone };
      const pdf = await tracePdf(
        'Trace report',
        `Kegs filled ${formatDate(q.from, ctx)} to ${formatDate(q.to, ctx)}, by batch, and where each is now (as of ${formatDate(now, ctx)}).`,
        report.batches,
        now,
        coop,
      );
      res.type('application/pdf').set('Content-Disposition', `inline; filename="${name}.pdf"`).set('Cache-Control', 'no-store').send(pdf);
    } else {
      res.json(report);
    }
  });
  return router;
}
