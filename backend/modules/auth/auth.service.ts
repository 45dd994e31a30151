import { createHash, randomBytes } from 'node:crypto';
import { hash, verify } from '@node-rs/argon2';
import { sql } from 'kysely';
import type { Role } from '../../../shared/permissions/roles.ts';
import type { Database } from '../../db/database.ts';
import type { AppUserRow } from '../../db/schema.ts';
import { gone, notFound } from '../../lib/http-problem.ts';

export interface SessionUser {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  units: 'metric' | 'us';
}

export const toSessionUser = (row: Pick<AppUserRow, 'id' | 'email' | 'name' | 'roles' | 'units'>): SessionUser => ({
  id: row.id,
  email: row.email,
  name: row.name,
  roles: row.roles,
  units: row.units,
});

// Verifying against a real hash when the account does not exist keeps the timing of both answers alike.
let dummyHash: Promise<string> | null = null;

export async function checkCredentials(db: Database, email: string, password: string): Promise<AppUserRow | null> {
  const row = await db.selectFrom('app_user').selectAll().where('email', '=', email.toLowerCase()).executeTakeFirst();
  if (!row || !row.password_hash || !row.is_active) {
    dummyHash ??= hash('not-a-real-password');
    await verify(await dummyHash, password).catch(() => false);
    return null;
  }
  const ok = await verify(row.password_hash, password).catch(() => false);
  return ok ? row : null;
}

export const hashPassword = (password: string) => hash(password);

export async function findActiveUser(db: Database, id: string): Promise<SessionUser | null> {
  const row = await db
    .selectFrom('app_user')
    .select(['id', 'email', 'name', 'roles', 'units'])
    .where('id', '=', id)
    .where('is_active', '=', true)
    .executeTakeFirst();
  return row ? toSessionUser(row) : null;
}

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

export type TokenPurpose = 'invitation' | 'password_reset' | 'account_unlock';
const tokenLabels: Record<TokenPurpose, string> = { invitation: 'Invitation', password_reset: 'Reset link', account_unlock: 'Unlock link' };

/** A single-use token; only its hash is stored. Returns the token to put in the link. */
export async function issueToken(db: Database, userId: string, purpose: TokenPurpose, ttlHours: number, createdBy: string | null): Promise<string> {
  const token = randomBytes(32).toString('base64url');
  // A newer link replaces older unused ones of the same kind.
  await db
    .updateTable('user_token')
    .set({ used_at: new Date() })
    .where('user_id', '=', userId)
    .where('purpose', '=', purpose)
    .where('used_at', 'is', null)
    .execute();
  await db
    .insertInto('user_token')
    .values({ user_id: userId, purpose, token_hash: sha256(token), expires_at: new Date(Date.now() + ttlHours * 3600_000), created_by: createdBy })
    .execute();
  return token;
}

async function findToken(db: Database, token: string, purpose: TokenPurpose, lock: boolean) {
  let q = db
    .selectFrom('user_token')
    .innerJoin('app_user', 'app_user.id', 'user_token.user_id')
    .select(['user_token.id', 'user_token.user_id', 'user_token.expires_at', 'user_token.used_at', 'app_user.email', 'app_user.name', 'app_user.is_active'])
    .where('token_hash', '=', sha256(token))
    .where('purpose', '=', purpose);
  if (lock) q = q.forUpdate();
  const row = await q.executeTakeFirst();
  const label = tokenLabels[purpose];
  if (!row || !row.is_active) throw notFound(label);
  if (row.used_at) throw gone(`${label} has already been used.`);
  if (new Date(row.expires_at) <= new Date()) throw gone(`${label} has expired.`);
  return row;
}

export const peekToken = (db: Database, token: string, purpose: TokenPurpose) => findToken(db, token, purpose, false);

/** Marks the token used and returns its user id; call inside the transaction that acts on it. */
export async function consumeToken(db: Database, token: string, purpose: TokenPurpose) {
  const row = await findToken(db, token, purpose, true);
  await db.updateTable('user_token').set({ used_at: new Date() }).where('id', '=', row.id).execute();
  return row;
}

/** Ends every session of a user (deactivation, password change). */
export async function endSessionsOf(db: Database, userId: string, exceptSid?: string): Promise<void> {
  let q = db.deleteFrom('session').where(sql<string>`sess->>'userId'`, '=', userId);
  if (exceptSid) q = q.where('sid', '<>', exceptSid);
  await q.execute();
}
