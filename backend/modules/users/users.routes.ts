import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { sql } from 'kysely';
import { subject } from '../../../shared/permissions/ability.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import { inviteUserSchema, updateUserSchema, userListQuerySchema, type User as UserListItem } from '../../../shared/schemas/user.ts';
import { audit } from '../../lib/audit.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { conflict, notFound } from '../../lib/http-problem.ts';
import { enqueueMail } from '../../lib/mailer.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser } from '../../middleware/authenticate.ts';
import { endSessionsOf, issueToken } from '../auth/auth.service.ts';

const sortColumns = {
  name: 'name',
  email: 'email',
  createdAt: 'created_at',
  lastLoginAt: 'last_login_at',
} as const;

const INVITATION_TTL_HOURS = 7 * 24;

export function usersRoutes({ db, config, queue }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'User' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    const q = userListQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'User');
    let base = db.selectFrom('app_user');
    // Someone who may read only their own account sees only that row.
    if (!canAll(req.ability, 'read', 'User')) base = base.where('id', '=', req.user!.id);
    if (q.q) {
      const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
      base = base.where((eb) => eb.or([eb('name', 'ilike', like), eb('email', 'ilike', like)]));
    }
    if (q.role) base = base.where(sql<boolean>`${q.role} = any(roles)`);
    if (q.active !== undefined) base = base.where('is_active', '=', q.active);
    const [{ total }, rows] = await Promise.all([
      base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
      base
        .select(['id', 'email', 'name', 'roles', 'is_active', 'last_login_at', 'created_at'])
        .orderBy(sortColumns[q.sort], (ob) => (q.order === 'desc' ? ob.desc().nullsLast() : ob.asc().nullsLast()))
        .orderBy('id')
        .limit(q.pageSize)
        .offset((q.page - 1) * q.pageSize)
        .execute(),
    ]);
    const page: Page<UserListItem> = {
      items: rows.map((r) => ({
        id: r.id,
        email: r.email,
        name: r.name,
        roles: r.roles,
        isActive: r.is_active,
        lastLoginAt: r.last_login_at?.toISOString() ?? null,
        createdAt: r.created_at.toISOString(),
      })),
      total,
      page: q.page,
      pageSize: q.pageSize,
    };
    res.json(page);
  });

  router.post('/invitations', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'User');
    const input = inviteUserSchema.parse(req.body ?? {});
    const actor = req.user!;
    const { user, token } = await db.transaction().execute(async (trx) => {
      const created = await trx
        .insertInto('app_user')
        .values({ email: input.email, name: input.name, roles: input.roles })
        .onConflict((oc) => oc.doNothing())
        .returning(['id', 'email', 'name', 'roles', 'units'])
        .executeTakeFirst();
      if (!created) throw conflict(`${input.email} already has an account.`);
      const t = await issueToken(trx, created.id, 'invitation', INVITATION_TTL_HOURS, actor.id);
      await audit(trx, actor.id, 'invited', 'User', created.id, { email: input.email, roles: input.roles });
      return { user: created, token: t };
    });
    const link = `${config.publicUrl}/invitation?token=${token}`;
    await enqueueMail(queue, {
      to: user.email,
      subject: 'You are invited to Cellarwright at Larkspur Yard Brewing Co-op',
      text: `Hello ${user.name},\n\n${actor.name} has invited you to Cellarwright, the back office of Larkspur Yard Brewing Co-op.\nSet your password here (the link works once, for seven days):\n\n${link}\n`,
    });
    res.status(201).json({ user: { ...user, isActive: true } });
  });

  router.patch('/:id', async (req, res) => {
    const target = await db.selectFrom('app_user').select(['id', 'roles', 'is_active']).where('id', '=', req.params.id).executeTakeFirst();
    if (!target || !req.ability.can('read', subject('User', { id: target.id }))) throw notFound('User');
    ForbiddenError.from(req.ability).throwUnlessCan('update', subject('User', { id: target.id }));
    const input = updateUserSchema.parse(req.body ?? {});
    // Roles and activation are the manager's alone.
    if (input.roles !== undefined || input.isActive !== undefined) ForbiddenError.from(req.ability).throwUnlessCan('manage', 'User');
    const actor = req.user!;
    if (target.id === actor.id && (input.isActive === false || (input.roles && !input.roles.includes('admin') && target.roles.includes('admin')))) {
      throw conflict('You cannot deactivate yourself or take away your own admin role; ask another admin.');
    }
    const row = await db.transaction().execute(async (trx) => {
      const updated = await trx
        .updateTable('app_user')
        .set({
          ...(input.name !== undefined ? { name: input.name } : {}),
          ...(input.roles !== undefined ? { roles: [...new Set(input.roles)] } : {}),
          ...(input.isActive !== undefined ? { is_active: input.isActive } : {}),
          updated_at: new Date(),
        })
        .where('id', '=', target.id)
        .returning(['id', 'email', 'name', 'roles', 'units', 'is_active', 'last_login_at', 'created_at'])
        .executeTakeFirstOrThrow();
      if (input.isActive === false) await endSessionsOf(trx, target.id);
      await audit(trx, actor.id, input.isActive === false ? 'deactivated' : 'updated', 'User', target.id, input);
      return updated;
    });
    res.json({
      user: {
        id: row.id,
        email: row.email,
        name: row.name,
        roles: row.roles,
        units: row.units,
        isActive: row.is_active,
        lastLoginAt: row.last_login_at?.toISOString() ?? null,
        createdAt: row.created_at.toISOString(),
      },
    });
  });

  return router;
}
