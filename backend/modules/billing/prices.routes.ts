import type { Router } from 'express';
import { priceInputSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { getBillingProfile } from './billing-profile.service.ts';
import { can, idParam, signedInRouter } from './invoice-access.ts';
import { addPrice, listPrices, removePrice } from './prices.service.ts';

/** The price list: prices from a date on, with the tax rates and currency they are charged in. */
/**
 * Adding an entry of the price list (a price, a tax rate) from a date on, and removing one before it takes
 * effect: `POST /` answers `{ [key]: entry }`, `DELETE /:id` 204.
 */
export function priceListEntries<I, E>(
  router: Router,
  { db, clock }: Deps,
  entry: {
    key: string;
    schema: { parse: (body: unknown) => I };
    add: (db: Deps['db'], input: I, actorId: string, now: Date) => Promise<E>;
    remove: (db: Deps['db'], id: string, actorId: string, now: Date) => Promise<void>;
  },
): void {
  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('create', 'PriceList');
    const input = entry.schema.parse(req.body ?? {});
    res.status(201).json({ [entry.key]: await entry.add(db, input, userOf(req).id, clock.now()) });
  });

  router.delete('/:id', async (req, res) => {
    can(req).throwUnlessCan('delete', 'PriceList');
    const { id } = idParam.parse(req.params);
    await entry.remove(db, id, userOf(req).id, clock.now());
    res.status(204).end();
  });
}

export function pricesRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = signedInRouter({ id: 'Price' });

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    const { prices, taxRates, today } = await listPrices(db, clock.now());
    const profile = await getBillingProfile(db);
    res.json({ items: prices, total: prices.length, page: 1, pageSize: Math.max(prices.length, 1), taxRates, currency: profile.currency, today });
  });

  priceListEntries(router, deps, { key: 'price', schema: priceInputSchema, add: addPrice, remove: removePrice });

  return router;
}
