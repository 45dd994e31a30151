import { Router } from 'express';
import { taxRateInputSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { can, idParam } from './invoice-access.ts';
import { addTaxRate, listPrices, removeTaxRate } from './prices.service.ts';

/** Tax rates from a date on, part of the price list. */
export function taxRatesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Tax rate' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    const { taxRates } = await listPrices(db, clock.now());
    res.json({ items: taxRates, total: taxRates.length, page: 1, pageSize: Math.max(taxRates.length, 1) });
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('create', 'PriceList');
    const input = taxRateInputSchema.parse(req.body ?? {});
    res.status(201).json({ taxRate: await addTaxRate(db, input, userOf(req).id, clock.now()) });
  });

  router.delete('/:id', async (req, res) => {
    can(req).throwUnlessCan('delete', 'PriceList');
    const { id } = idParam.parse(req.params);
    await removeTaxRate(db, id, userOf(req).id, clock.now());
    res.status(204).end();
  });

  return router;
}
