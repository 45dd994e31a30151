import type PgBoss from 'pg-boss';
import type { AcceptInvitationInput, UpdateMeInput } from '../../../shared/schemas/auth.ts';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { enqueueMail } from '../../lib/mailer.ts';
import { passwordResetMail } from '../mail/templates/password-reset.ts';
import { signInLockedMail } from '../mail/templates/sign-in-locked.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { completeInvitedAccount, findActiveUserByEmail, markSignedIn, setPasswordHash, updateOwnProfile } from './auth.repository.ts';
import { consumeToken, endSessionsOf, hashPassword, issueToken, toSessionUser, type SessionUser } from './auth.service.ts';
import type { LoginThrottle } from './login-throttle.ts';

/** What the account flows that send mail need. */
export interface AccountDeps {
  db: Database;
  config: Config;
  queue: PgBoss;
}

/** How long an e-mailed unlock link works. */
const unlockLinkHours = 24;

/** Mails the owner of a just-locked account a one-time link that lifts the lock. */
export async function sendUnlockLink({ db, config, queue }: AccountDeps, email: string, now: Date): Promise<void> {
  const user = await findActiveUserByEmail(db, email);
  if (!user) return;
  const token = await issueToken(db, user.id, 'account_unlock', unlockLinkHours, null, now);
  const link = `${config.publicUrl}/unlock?token=${token}`;
  await audit(db, null, 'sign_in_locked', 'User', user.id, { failures: config.LOGIN_LOCK_PER_ACCOUNT });
  const { coopName } = await coopProfile(db);
  await enqueueMail(queue, {
    to: user.email,
    ...signInLockedMail({
      coopName,
      name: user.name,
      failures: config.LOGIN_LOCK_PER_ACCOUNT,
      lockMinutes: config.LOGIN_LOCK_WINDOW_MINUTES,
      link,
      linkHours: unlockLinkHours,
    }),
  });
}

/** Mails a reset link when the address belongs to an active account; says nothing either way. */
export async function requestPasswordReset({ db, config, queue }: AccountDeps, email: string, now: Date): Promise<void> {
  const user = await findActiveUserByEmail(db, email);
  if (!user) return;
  const token = await issueToken(db, user.id, 'password_reset', 1, null, now);
  const link = `${config.publicUrl}/reset-password?token=${token}`;
  const { coopName } = await coopProfile(db);
  await enqueueMail(queue, { to: user.email, ...passwordResetMail({ coopName, name: user.name, link }) });
}

export async function recordSignIn(db: Database, userId: string, now: Date): Promise<void> {
  await markSignedIn(db, userId, now);
  await audit(db, userId, 'signed_in', 'User', userId);
}

export async function updateMe(db: Database, userId: string, input: UpdateMeInput, now: Date): Promise<SessionUser> {
  return toSessionUser(await updateOwnProfile(db, userId, input, now));
}

/** Sets a new password from a reset link, ends every session of the account and lifts a sign-in lock. */
export async function resetPassword(db: Database, throttle: LoginThrottle, input: { token: string; password: string }, now: Date): Promise<void> {
  const passwordHash = await hashPassword(input.password);
  await db.transaction().execute(async (trx) => {
    const tok = await consumeToken(trx, input.token, 'password_reset', now);
    await setPasswordHash(trx, tok.user_id, passwordHash, now);
    await endSessionsOf(trx, tok.user_id);
    // Whoever reads the owner's mail may sign in again: a new password lifts a sign-in lock too.
    await throttle.unlock(trx, tok.email);
    await audit(trx, tok.user_id, 'password_reset', 'User', tok.user_id);
  });
}

export async function unlockAccount(db: Database, throttle: LoginThrottle, token: string, now: Date): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const tok = await consumeToken(trx, token, 'account_unlock', now);
    await throttle.unlock(trx, tok.email);
    await audit(trx, tok.user_id, 'sign_in_unlocked', 'User', tok.user_id);
  });
}

/** The invited person chooses a name and password; returns who to sign in. */
export async function acceptInvitation(db: Database, input: AcceptInvitationInput, now: Date): Promise<SessionUser> {
  const passwordHash = await hashPassword(input.password);
  const row = await db.transaction().execute(async (trx) => {
    const tok = await consumeToken(trx, input.token, 'invitation', now);
    const updated = await completeInvitedAccount(trx, tok.user_id, { name: input.name, passwordHash }, now);
    await audit(trx, tok.user_id, 'invitation_accepted', 'User', tok.user_id);
    return updated;
  });
  return toSessionUser(row);
}
