import { sql } from 'kysely';
import type { InviteUserInput, UpdateUserInput, UserListQuery } from '../../../shared/schemas/user.ts';
import type { Database } from '../../db/database.ts';
import { containsPattern, orderByAllowed, paginate } from '../../lib/paginate.ts';

const sortColumns = {
  name: 'name',
  email: 'email',
  createdAt: 'created_at',
  lastLoginAt: 'last_login_at',
} as const;

/** One page of account rows; `onlyId` limits it to one account. */
export function pageUsers(db: Database, q: UserListQuery, onlyId?: string) {
  let base = db.selectFrom('app_user');
  if (onlyId) base = base.where('id', '=', onlyId);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) => eb.or([eb('name', 'ilike', like), eb('email', 'ilike', like)]));
  }
  if (q.role) base = base.where(sql<boolean>`${q.role} = any(roles)`);
  if (q.active !== undefined) base = base.where('is_active', '=', q.active);
  return paginate(base, (qb) => orderByAllowed(qb.select(['id', 'email', 'name', 'roles', 'is_active', 'last_login_at', 'created_at']), sortColumns, q), q);
}

/** Inserts a new account; undefined when the address already has one. */
export function insertUser(db: Database, input: InviteUserInput) {
  return db
    .insertInto('app_user')
    .values({ email: input.email, name: input.name, roles: input.roles })
    .onConflict((oc) => oc.doNothing())
    .returning(['id', 'email', 'name', 'roles', 'units'])
    .executeTakeFirst();
}

export function findUserById(db: Database, id: string) {
  return db.selectFrom('app_user').select(['id', 'roles', 'is_active']).where('id', '=', id).executeTakeFirst();
}

/** Changes the given fields of an account and returns its row. */
export function updateUserRow(db: Database, id: string, input: UpdateUserInput, at: Date) {
  return db
    .updateTable('app_user')
    .set({
      ...(input.name !== undefined ? { name: input.name } : {}),
      ...(input.roles !== undefined ? { roles: [...new Set(input.roles)] } : {}),
      ...(input.isActive !== undefined ? { is_active: input.isActive } : {}),
      updated_at: at,
    })
    .where('id', '=', id)
    .returning(['id', 'email', 'name', 'roles', 'units', 'is_active', 'last_login_at', 'created_at'])
    .executeTakeFirstOrThrow();
}
