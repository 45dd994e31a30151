import { sql } from 'kysely';
import type { Database } from '../../db/database.ts';

/** The columns a session keeps of a person. */
const sessionColumns = ['id', 'email', 'name', 'roles', 'units'] as const;

/** An active account by its e-mail address (addresses are stored in lower case). */
export function findActiveUserByEmail(db: Database, email: string) {
  return db.selectFrom('app_user').select(['id', 'name', 'email']).where('email', '=', email).where('is_active', '=', true).executeTakeFirst();
}

export async function markSignedIn(db: Database, userId: string, at: Date): Promise<void> {
  await db.updateTable('app_user').set({ last_login_at: at }).where('id', '=', userId).execute();
}

/** Changes a person's own name and units; returns what the session shows. */
export function updateOwnProfile(db: Database, userId: string, input: { name?: string | undefined; units?: 'metric' | 'us' | undefined }, at: Date) {
  return db
    .updateTable('app_user')
    .set({ ...(input.name ? { name: input.name } : {}), ...(input.units ? { units: input.units } : {}), updated_at: at })
    .where('id', '=', userId)
    .returning(sessionColumns)
    .executeTakeFirstOrThrow();
}

export async function setPasswordHash(db: Database, userId: string, passwordHash: string, at: Date): Promise<void> {
  await db.updateTable('app_user').set({ password_hash: passwordHash, updated_at: at }).where('id', '=', userId).execute();
}

/** The invited person's first password and name; the acceptance counts as their first sign-in. */
export function completeInvitedAccount(db: Database, userId: string, input: { name: string; passwordHash: string }, at: Date) {
  return db
    .updateTable('app_user')
    .set({ password_hash: input.passwordHash, name: input.name, updated_at: at, last_login_at: at })
    .where('id', '=', userId)
    .returning(sessionColumns)
    .executeTakeFirstOrThrow();
}

/** Any account by its e-mail address, active or not, with its password hash. */
export function findUserByEmail(db: Database, email: string) {
  return db.selectFrom('app_user').selectAll().where('email', '=', email).executeTakeFirst();
}

/** An active account by id, with the columns a session keeps. */
export function findActiveSessionUser(db: Database, id: string) {
  return db.selectFrom('app_user').select(sessionColumns).where('id', '=', id).where('is_active', '=', true).executeTakeFirst();
}

export type TokenPurpose = 'invitation' | 'password_reset' | 'account_unlock';

/** Marks a user's unused tokens of one kind used, so only a newer one stays valid. */
export async function retireUnusedTokens(db: Database, userId: string, purpose: TokenPurpose, at: Date): Promise<void> {
  await db.updateTable('user_token').set({ used_at: at }).where('user_id', '=', userId).where('purpose', '=', purpose).where('used_at', 'is', null).execute();
}

export async function insertToken(
  db: Database,
  values: { userId: string; purpose: TokenPurpose; tokenHash: string; expiresAt: Date; createdBy: string | null },
): Promise<void> {
  await db
    .insertInto('user_token')
    .values({ user_id: values.userId, purpose: values.purpose, token_hash: values.tokenHash, expires_at: values.expiresAt, created_by: values.createdBy })
    .execute();
}

/** A token by its hash and kind, with the person it belongs to; `lock` holds the row for the transaction. */
export function findTokenByHash(db: Database, tokenHash: string, purpose: TokenPurpose, lock: boolean) {
  let q = db
    .selectFrom('user_token')
    .innerJoin('app_user', 'app_user.id', 'user_token.user_id')
    .select(['user_token.id', 'user_token.user_id', 'user_token.expires_at', 'user_token.used_at', 'app_user.email', 'app_user.name', 'app_user.is_active'])
    .where('token_hash', '=', tokenHash)
    .where('purpose', '=', purpose);
  if (lock) q = q.forUpdate();
  return q.executeTakeFirst();
}

export async function markTokenUsed(db: Database, tokenId: string, at: Date): Promise<void> {
  await db.updateTable('user_token').set({ used_at: at }).where('id', '=', tokenId).execute();
}

/** Deletes every session of a user, except `exceptSid` when given. */
export async function deleteSessionsOf(db: Database, userId: string, exceptSid?: string): Promise<void> {
  let q = db.deleteFrom('session').where(sql<string>`sess->>'userId'`, '=', userId);
  if (exceptSid) q = q.where('sid', '<>', exceptSid);
  await q.execute();
}
