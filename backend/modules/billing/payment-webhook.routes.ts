import { Router } from 'express';
import type { Deps } from '../../lib/deps.ts';
import { badRequest } from '../../lib/http-problem.ts';
import { verifyWebhook } from './payment-provider.ts';
import { handleProviderEvent } from './payments.service.ts';

/** The payment provider's webhook: no session, no CSRF token; the signature over the raw body is the check. */
export function paymentWebhookRoutes({ db, config, clock, queue }: Deps): Router {
  const router = Router();
  router.post('/payments', async (req, res) => {
    const signature = req.get('stripe-signature');
    if (!signature) throw badRequest('The Stripe-Signature header is missing.');
    if (!Buffer.isBuffer(req.body) || req.body.length === 0) throw badRequest('The webhook body is empty.');
    let event;
    try {
      event = verifyWebhook(config, req.body, signature);
    } catch (err) {
      req.log?.warn({ err: (err as Error).message }, 'payment webhook with a bad signature');
      throw badRequest('The signature does not match the body: the event is rejected.');
    }
    const result = await handleProviderEvent(db, event, clock.now(), queue);
    res.json({ received: true, ...result });
  });
  return router;
}
