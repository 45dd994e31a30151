import { Router } from 'express';
import { periodLabel } from '../../../shared/billing/dates.ts';
import { invoiceExportQuerySchema } from '../../../shared/schemas/billing.ts';
import { audit } from '../../lib/audit.ts';
import type { Deps } from '../../lib/deps.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { ledgerCsv, ledgerXlsx, periodLedger } from './exports.service.ts';
import { can, signedInRouter } from './invoice-access.ts';

/** A period's ledger for the books: `GET /api/invoices/export?period=&format=csv|xlsx`. */
export function billingExportsRoutes({ db }: Deps): Router {
  const router = signedInRouter();

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('export', 'Invoice');
    const q = invoiceExportQuerySchema.parse(req.query);
    const sheets = await periodLedger(db, q.period);
    await audit(db, userOf(req).id, 'exported', 'Invoice', null, { period: q.period, format: q.format });
    const name = `cellarwright-ledger-${q.period}`;
    if (q.format === 'xlsx') {
      const body = await ledgerXlsx(sheets, `Ledger ${periodLabel(q.period)}`);
      res.type('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet').attachment(`${name}.xlsx`).send(body);
      return;
    }
    res.type('text/csv; charset=utf-8').attachment(`${name}.csv`).send(ledgerCsv(sheets));
  });

  return router;
}
