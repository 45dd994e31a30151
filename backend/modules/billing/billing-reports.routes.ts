import { Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import { ageingQuerySchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { coopToday, getBillingProfile } from './billing-profile.service.ts';
import { can, requireEveryInvoice, signedInRouter } from './invoice-access.ts';
import { memberBalance } from './invoice-queries.service.ts';
import { ageingReport, billingSummary } from './reports.service.ts';

/** The treasurer's overview (`/summary`, `/ageing`) and a member's balance (`/balance`), under `/api/billing`. */
export function billingReportsRoutes({ db, clock }: Deps): Router {
  const router = signedInRouter();

  router.get('/summary', async (req, res) => {
    requireEveryInvoice(req);
    res.json(await billingSummary(db, clock.now()));
  });

  router.get('/ageing', async (req, res) => {
    requireEveryInvoice(req);
    const q = ageingQuerySchema.parse(req.query);
    res.json(await ageingReport(db, clock.now(), q.asOf));
  });

  /** A member's own balance; the treasurer may ask for anyone's with ?memberId=. */
  router.get('/balance', async (req, res) => {
    can(req).throwUnlessCan('read', 'Invoice');
    const q = z.object({ memberId: z.uuid().optional() }).parse(req.query);
    const memberId = q.memberId ?? userOf(req).id;
    if (!req.ability.can('read', subject('Invoice', { memberId }))) throw notFound('Member');
    const [{ today }, profile] = await Promise.all([coopToday(db, clock.now()), getBillingProfile(db)]);
    res.json(await memberBalance(db, memberId, today, profile.currency));
  });

  return router;
}
