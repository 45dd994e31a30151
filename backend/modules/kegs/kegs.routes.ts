import { ForbiddenError } from '@casl/ability';
import type { Request, Response, Router } from 'express';
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
  type KegListQuery,
} from '../../../shared/schemas/kegs.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { listHandler, signedInRouter, type Parser } from '../../lib/route-handlers.ts';
import { userOf } from '../../middleware/authenticate.ts';
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
  const router = signedInRouter({ id: 'Keg' });

  /** A list of kegs: a member sees the kegs they hold; holders are named to whoever may see them. */
  const kegList = (query: Parser<KegListQuery>) =>
    listHandler(query, 'Keg', (q, { req, restrictTo }) =>
      listKegs(db, q, { memberId: restrictTo, showOwner: req.ability.can('readOwner', 'Keg') }, clock.now()),
    );
  router.get('/', kegList(kegListQuerySchema));
  router.get('/overdue', kegList({ parse: (query) => kegListQuerySchema.parse({ sort: 'dueAt', ...(query as object), overdue: 'true' }) }));

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

  /** An action on a keg the person may see and `checkout`: the body parsed, the action run, the keg as it is now (with its undo offer, if any). */
  const checkoutAction =
    <I>(body: Parser<I>, run: (kegId: string, input: I, actor: { id: string }, now: Date) => Promise<KegUndoOffer | void>) =>
    async (req: Request, res: Response) => {
      const row = await loadVisible(req);
      ForbiddenError.from(req.ability).throwUnlessCan('checkout', subject('Keg', { memberId: kegMemberId(row) }));
      const input = body.parse(req.body ?? {});
      const undo = await run(row.id, input, userOf(req), clock.now());
      await answer(req, res, 200, undo ?? undefined);
    };

  router.post(
    '/:id/check-out',
    checkoutAction(kegCheckOutSchema, (id, input, actor, now) => checkOutKeg(db, id, input, actor, now)),
  );
  router.post(
    '/:id/return',
    checkoutAction(kegReturnSchema, (id, input, actor, now) => returnKeg(db, id, input, actor, now)),
  );
  router.post(
    '/:id/move',
    checkoutAction(kegMoveSchema, (id, input, actor, now) => moveKeg(db, id, input, actor, now)),
  );

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

  router.patch(
    '/:id/level',
    checkoutAction(kegLevelSchema, (id, input, actor, now) => setKegLevel(db, id, input.remainingLiters, actor, now)),
  );

  return router;
}
