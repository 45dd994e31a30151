import type { Router } from 'express';
import { invoiceRunInputSchema, invoiceRunPreviewQuerySchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { can, idParam, signedInRouter } from './invoice-access.ts';
import { issueRun, listRuns, previewRun, runPeriod, sendRun } from './invoice-runs.service.ts';

export function invoiceRunsRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = signedInRouter({ id: 'Invoice run' });

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'InvoiceRun');
    const items = await listRuns(db, 100);
    res.json({ items, total: items.length, page: 1, pageSize: 100 });
  });

  router.get('/preview', async (req, res) => {
    can(req).throwUnlessCan('run', 'InvoiceRun');
    const q = invoiceRunPreviewQuerySchema.parse(req.query);
    res.json(await previewRun(db, q.period, { now: clock.now() }));
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('run', 'InvoiceRun');
    const input = invoiceRunInputSchema.parse(req.body ?? {});
    const result = await runPeriod(db, input, userOf(req).id, { now: clock.now() });
    res.status(201).json(result);
  });

  /** E-mails every issued invoice of the run that has not been sent yet. */
  router.post('/:id/send', async (req, res) => {
    can(req).throwUnlessCan('send', 'Invoice');
    const { id } = idParam.parse(req.params);
    res.status(202).json({ queued: await sendRun(deps, id, userOf(req).id) });
  });

  router.post('/:id/issue', async (req, res) => {
    can(req).throwUnlessCan('update', 'Invoice');
    const { id } = idParam.parse(req.params);
    res.json({ issued: await issueRun(db, id, userOf(req).id, clock.now()) });
  });

  return router;
}
