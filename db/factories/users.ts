import { hash } from '@node-rs/argon2';
import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { AppUserTable } from '../../backend/db/tables/accounts.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import { type At, DEMO_PASSWORD, demoPasswordHash, LONG_AGO, nextSeq, toDate } from './common.ts';

export type UserRow = Selectable<AppUserTable>;

export interface UserOverrides {
  id?: string;
  /** Default: `person<n>@example.org`. Always lower case, always example.org in tests. */
  email?: string;
  name?: string;
  /** Default: ['member']. */
  roles?: Role[];
  units?: 'metric' | 'us';
  isActive?: boolean;
  /** Default: the demo password `cellar-demo`. `null`: an invited account that has not set one. */
  password?: string | null;
  /** Default: LONG_AGO (membership dues count from here). */
  createdAt?: At;
}

/** An account that can sign in with `cellar-demo` (or the given password). */
export async function createUser(db: Database, o: UserOverrides = {}): Promise<UserRow> {
  const n = nextSeq();
  const passwordHash =
    o.password === null ? null : o.password === undefined || o.password === DEMO_PASSWORD ? await demoPasswordHash() : await hash(o.password);
  const createdAt = toDate(o.createdAt ?? LONG_AGO, 'createdAt');
  return db
    .insertInto('app_user')
    .values({
      ...(o.id ? { id: o.id } : {}),
      email: (o.email ?? `person${n}@example.org`).toLowerCase(),
      name: o.name ?? `Test Person ${n}`,
      roles: o.roles ?? ['member'],
      units: o.units ?? 'metric',
      is_active: o.isActive ?? true,
      password_hash: passwordHash,
      created_at: createdAt,
      updated_at: createdAt,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

/** A co-op member (roles default to ['member']; pass `roles: ['member', 'brewer_on_duty']` for one on the rota). */
export function createMember(db: Database, o: UserOverrides = {}): Promise<UserRow> {
  const n = nextSeq();
  return createUser(db, { email: `member.${n}@example.org`, name: `Member ${n}`, ...o, roles: o.roles ?? ['member'] });
}
