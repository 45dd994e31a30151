import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { subject } from '../../../shared/permissions/ability.ts';
import { inviteUserSchema, updateUserSchema, userListQuerySchema } from '../../../shared/schemas/user.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { conflict, notFound } from '../../lib/http-problem.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { findUserForUpdate, inviteUser, listUsers, mailInvitation, updateUser } from './users.service.ts';

export function usersRoutes({ db, config, queue, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'User' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    const q = userListQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'User');
    // Someone who may read only their own account sees only that row.
    res.json(await listUsers(db, q, canAll(req.ability, 'read', 'User') ? undefined : userOf(req).id));
  });

  router.post('/invitations', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'User');
    const input = inviteUserSchema.parse(req.body ?? {});
    const actor = userOf(req);
    const { user, token } = await inviteUser(db, input, actor, clock.now());
    await mailInvitation({ db, config, queue }, user, token, actor.name);
    res.status(201).json({ user: { ...user, isActive: true } });
  });

  router.patch('/:id', async (req, res) => {
    const target = await findUserForUpdate(db, req.params.id);
    if (!target || !req.ability.can('read', subject('User', { id: target.id }))) throw notFound('User');
    ForbiddenError.from(req.ability).throwUnlessCan('update', subject('User', { id: target.id }));
    const input = updateUserSchema.parse(req.body ?? {});
    // Roles and activation are the manager's alone.
    if (input.roles !== undefined || input.isActive !== undefined) ForbiddenError.from(req.ability).throwUnlessCan('manage', 'User');
    const actor = userOf(req);
    if (target.id === actor.id && (input.isActive === false || (input.roles && !input.roles.includes('admin') && target.roles.includes('admin')))) {
      throw conflict('You cannot deactivate yourself or take away your own admin role; ask another admin.');
    }
    res.json({ user: await updateUser(db, target.id, input, actor, clock.now()) });
  });

  return router;
}
