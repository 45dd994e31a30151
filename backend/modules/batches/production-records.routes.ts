import { ForbiddenError } from '@casl/ability';
import { Router, type Request, type Response } from 'express';
import { productionRecordsQuerySchema } from '../../../shared/schemas/batches.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { coopTimeZone } from '../settings/settings.service.ts';
import { productionRecords, productionRecordsCsv, productionRecordsXlsx } from './production-records.service.ts';

export function productionRecordsRoutes({ db, clock }: Deps): Router {
  const router = Router();
  router.use(requireUser);

  async function answer(req: Request, res: Response, format: 'json' | 'csv' | 'xlsx') {
    const q = productionRecordsQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'ProductionRecord');
    if (format !== 'json') ForbiddenError.from(req.ability).throwUnlessCan('export', 'ProductionRecord');
    // Whoever may read only their own records (a member) sees only their own batches.
    const ownerId = !canAll(req.ability, 'read', 'ProductionRecord') || q.mine ? userOf(req).id : undefined;
    const timeZone = await coopTimeZone(db);
    const report = await productionRecords(db, { from: q.from, to: q.to, ownerId, timeZone, now: clock.now() });
    const name = `production-records-${report.from}-to-${report.to}`;
    if (format === 'csv') {
      res.type('text/csv; charset=utf-8').attachment(`${name}.csv`).send(productionRecordsCsv(report));
    } else if (format === 'xlsx') {
      res
        .type('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet')
        .attachment(`${name}.xlsx`)
        .send(await productionRecordsXlsx(report));
    } else {
      res.json(report);
    }
  }

  router.get('/', (req, res) => answer(req, res, productionRecordsQuerySchema.parse(req.query).format));
  router.get('/export', (req, res) => {
    const format = productionRecordsQuerySchema.parse(req.query).format;
    return answer(req, res, format === 'json' ? 'csv' : format);
  });
  return router;
}
