import { ForbiddenError } from '@casl/ability';
import type { Request, Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import {
  carbonationPlanListQuerySchema,
  createCarbonationPlanSchema,
  previewCarbonationPlanSchema,
  updateCarbonationPlanSchema,
} from '../../../shared/schemas/carbonation.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { createHandler, listHandler, signedInRouter } from '../../lib/route-handlers.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { listPlans, planMemberId, planViews } from './carbonation-queries.service.ts';
import { createPlan, markPressureLowered, previewPlan, setPlanState } from './carbonation.service.ts';

/** `/api/carbonation-plans`: target CO2 volumes → regulator pressure, ready date and the fast-start reminder. */
export function carbonationRoutes({ db, queue, clock }: Deps): Router {
  const router = signedInRouter({ id: 'Carbonation plan' });

  router.post('/preview', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'CarbonationPlan');
    const input = previewCarbonationPlanSchema.parse(req.body ?? {});
    res.json({ plan: await previewPlan(db, input, clock.now()) });
  });

  const create = createHandler(createCarbonationPlanSchema, 'CarbonationPlan', async (input, actor) => ({
    plan: await createPlan(db, queue, input, actor, clock.now()),
  }));
  const list = listHandler(carbonationPlanListQuerySchema, 'CarbonationPlan', (q, { restrictTo }) => listPlans(db, q, clock.now(), restrictTo));
  router.route('/').post(create).get(list);

  /** Loads a plan the person may see (404 otherwise) and checks `action` on it. */
  async function visiblePlan(req: Request, action: 'read' | 'update') {
    const id = z.uuid().safeParse(req.params.id);
    if (!id.success) throw notFound('Carbonation plan');
    const memberId = await planMemberId(db, id.data);
    if (memberId === undefined || !req.ability.can('read', subject('CarbonationPlan', { memberId: memberId ?? '' }))) throw notFound('Carbonation plan');
    ForbiddenError.from(req.ability).throwUnlessCan(action, subject('CarbonationPlan', { memberId: memberId ?? '' }));
    return id.data;
  }

  router.get('/:id', async (req, res) => {
    const id = await visiblePlan(req, 'read');
    const [plan] = await planViews(db, [id]);
    res.json({ plan });
  });

  router.post('/:id/pressure-lowered', async (req, res) => {
    const id = await visiblePlan(req, 'update');
    await markPressureLowered(db, queue, id, userOf(req), clock.now());
    const [plan] = await planViews(db, [id]);
    res.json({ plan });
  });

  router.patch('/:id', async (req, res) => {
    const id = await visiblePlan(req, 'update');
    const input = updateCarbonationPlanSchema.parse(req.body ?? {});
    await setPlanState(db, queue, id, input.state, userOf(req), clock.now());
    const [plan] = await planViews(db, [id]);
    res.json({ plan });
  });

  return router;
}
