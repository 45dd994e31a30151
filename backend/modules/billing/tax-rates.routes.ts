import type { Router } from 'express';
import { taxRateInputSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { can, signedInRouter } from './invoice-access.ts';
import { priceListEntries } from './prices.routes.ts';
import { addTaxRate, listPrices, removeTaxRate } from './prices.service.ts';

/** Tax rates from a date on, part of the price list. */
export function taxRatesRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = signedInRouter({ id: 'Tax rate' });

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    const { taxRates } = await listPrices(db, clock.now());
    res.json({ items: taxRates, total: taxRates.length, page: 1, pageSize: Math.max(taxRates.length, 1) });
  });

  priceListEntries(router, deps, { key: 'taxRate', schema: taxRateInputSchema, add: addTaxRate, remove: removeTaxRate });

  return router;
}
