import { Router } from 'express';
import { billingProfileSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { getBillingProfile, saveBillingProfile } from './billing-profile.service.ts';
import { can, signedInRouter } from './invoice-access.ts';

/** The invoice header and how members pay: `GET/PUT /api/billing/profile`. */
export function billingProfileRoutes({ db, clock }: Deps): Router {
  const router = signedInRouter();

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    res.json({ profile: await getBillingProfile(db) });
  });

  router.put('/', async (req, res) => {
    can(req).throwUnlessCan('update', 'PriceList');
    const input = billingProfileSchema.parse(req.body ?? {});
    res.json({ profile: await saveBillingProfile(db, input, userOf(req).id, clock.now()) });
  });

  return router;
}
