import { Router } from 'express';
import { priceInputSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { getBillingProfile } from './billing-profile.service.ts';
import { can, idParam } from './invoice-access.ts';
import { addPrice, listPrices, removePrice } from './prices.service.ts';

/** The price list: prices from a date on, with the tax rates and currency they are charged in. */
export function pricesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Price' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    const { prices, taxRates, today } = await listPrices(db, clock.now());
    const profile = await getBillingProfile(db);
    res.json({ items: prices, total: prices.length, page: 1, pageSize: Math.max(prices.length, 1), taxRates, currency: profile.currency, today });
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('create', 'PriceList');
    const input = priceInputSchema.parse(req.body ?? {});
    res.status(201).json({ price: await addPrice(db, input, userOf(req).id, clock.now()) });
  });

  router.delete('/:id', async (req, res) => {
    can(req).throwUnlessCan('delete', 'PriceList');
    const { id } = idParam.parse(req.params);
    await removePrice(db, id, userOf(req).id, clock.now());
    res.status(204).end();
  });

  return router;
}
