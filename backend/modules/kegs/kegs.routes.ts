import { ForbiddenError } from '@casl/ability';
import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import {
  kegCheckOutSchema,
  kegEmptySchema,
  kegHistoryQuerySchema,
  kegLevelSchema,
  kegListQuerySchema,
  kegMoveSchema,
  kegReturnSchema,
  kegUndoSchema,
} from '../../../shared/schemas/kegs.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import {
  checkOutKeg,
  emptyKeg,
  findKeg,
  kegHistory,
  kegMemberId,
  kegView,
  listKegs,
  moveKeg,
  returnKeg,
  setKegLevel,
  tapBoard,
  undoKegAction,
  type KegUndoOffer,
} from './kegs.service.ts';

/** `/api/kegs`: whereabouts, check-out and return, overdue, a keg's page and history, the tap board. */
export function kegsRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Keg' });
  router.use(requireUser);

  const visibility = (req: Request) => ({
    memberId: canAll(req.ability, 'read', 'Keg') ? undefined : userOf(req).id,
    showOwner: req.ability.can('readOwner', 'Keg'),
  });

  router.get('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Keg');
    const q = kegListQuerySchema.parse(req.query);
    res.json(await listKegs(db, q, visibility(req), clock.now()));
  });

  router.get('/overdue', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Keg');
    const q = kegListQuerySchema.parse({ sort: 'dueAt', ...req.query, overdue: 'true' });
    res.json(await listKegs(db, q, visibility(req), clock.now()));
  });

  router.get('/tap-board', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Equipment');
    const showOwner = req.ability.can('readOwner', 'Keg');
    const taps = await tapBoard(db, (row) => req.ability.can('read', subject('Keg', { memberId: kegMemberId(row) })), showOwner, clock.now());
    res.json({ taps });
  });

  const loadVisible = async (req: Request) => {
    const id = z.uuid().safeParse(req.params.id);
    if (!id.success) throw notFound('Keg');
    const row = await findKeg(db, id.data, clock.now());
    if (!row || !req.ability.can('read', subject('Keg', { memberId: kegMemberId(row) }))) throw notFound('Keg');
    return row;
  };

  router.get('/:id', async (req, res) => {
    const row = await loadVisible(req);
    res.json({ keg: kegView(row, req.ability.can('readOwner', 'Keg')) });
  });

  router.get('/:id/history', async (req, res) => {
    const row = await loadVisible(req);
    // The whole history names every member who had the keg: for those who may see holders.
    ForbiddenError.from(req.ability).throwUnlessCan('readOwner', subject('Keg', { memberId: kegMemberId(row) }));
    const q = kegHistoryQuerySchema.parse(req.query);
    res.json(await kegHistory(db, row.id, q.page, q.pageSize));
  });

  const answer = async (req: Request, res: Response, status = 200, undo?: KegUndoOffer) => {
    const row = await findKeg(db, req.params.id as string, clock.now());
    res.status(status).json({ keg: kegView(row!, req.ability.can('readOwner', 'Keg')), ...(undo ? { undo } : {}) });
  };

  router.post('/:id/check-out', async (req, res) => {
    const row = await loadVisible(req);
    ForbiddenError.from(req.ability).throwUnlessCan('checkout', subject('Keg', { memberId: kegMemberId(row) }));
    const input = kegCheckOutSchema.parse(req.body ?? {});
    await checkOutKeg(db, row.id, input, userOf(req), clock.now());
    await answer(req, res);
  });

  router.post('/:id/return', async (req, res) => {
    const row = await loadVisible(req);
    ForbiddenError.from(req.ability).throwUnlessCan('checkout', subject('Keg', { memberId: kegMemberId(row) }));
    const input = kegReturnSchema.parse(req.body ?? {});
    const undo = await returnKeg(db, row.id, input, userOf(req), clock.now());
    await answer(req, res, 200, undo);
  });

  router.post('/:id/move', async (req, res) => {
    const row = await loadVisible(req);
    ForbiddenError.from(req.ability).throwUnlessCan('checkout', subject('Keg', { memberId: kegMemberId(row) }));
    const input = kegMoveSchema.parse(req.body ?? {});
    await moveKeg(db, row.id, input, userOf(req), clock.now());
    await answer(req, res);
  });

  router.post('/:id/empty', async (req, res) => {
    const row = await loadVisible(req);
    // Emptying changes the vessel's state.
    ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    const input = kegEmptySchema.parse(req.body ?? {});
    const undo = await emptyKeg(db, row.id, input, userOf(req), clock.now());
    await answer(req, res, 200, undo);
  });

  // Undo of a return, an emptying or a dump, for whoever may do that action, while nothing has touched the keg since.
  router.post('/:id/undo', async (req, res) => {
    const row = await loadVisible(req);
    if (!req.ability.can('checkout', subject('Keg', { memberId: kegMemberId(row) }))) ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    const input = kegUndoSchema.parse(req.body ?? {});
    const authorize = (action: 'returned' | 'emptied' | 'dumped') => {
      if (action === 'returned') ForbiddenError.from(req.ability).throwUnlessCan('checkout', subject('Keg', { memberId: kegMemberId(row) }));
      else ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    };
    await undoKegAction(db, row.id, input.actionId, authorize, userOf(req), clock.now());
    await answer(req, res);
  });

  router.patch('/:id/level', async (req, res) => {
    const row = await loadVisible(req);
    ForbiddenError.from(req.ability).throwUnlessCan('checkout', subject('Keg', { memberId: kegMemberId(row) }));
    const input = kegLevelSchema.parse(req.body ?? {});
    await setKegLevel(db, row.id, input.remainingLiters, userOf(req), clock.now());
    await answer(req, res);
  });

  return router;
}
