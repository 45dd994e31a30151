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
