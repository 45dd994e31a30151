import type { Page } from '../../../shared/schemas/pagination.ts';
import type { InviteUserInput, UpdateUserInput, UserListQuery, User as UserListItem } from '../../../shared/schemas/user.ts';
import { audit } from '../../lib/audit.ts';
import type { Deps } from '../../lib/deps.ts';
import { conflict } from '../../lib/http-problem.ts';
import { enqueueMail } from '../../lib/mailer.ts';
import { endSessionsOf, issueToken } from '../auth/auth.service.ts';
import { invitationMail } from '../mail/templates/invitation.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { findUserById, insertUser, pageUsers, updateUserRow } from './users.repository.ts';

type Db = Deps['db'];
type Actor = { id: string; name: string };

export const INVITATION_TTL_HOURS = 7 * 24;

/** One page of accounts; `onlyId` limits it to one account (someone who may read only their own). */
export async function listUsers(db: Db, q: UserListQuery, onlyId?: string): Promise<Page<UserListItem>> {
  const { rows, total } = await pageUsers(db, q, onlyId);
  return {
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
}

/** Creates the account and its one-time invitation token, with the audit row, in one transaction. */
export async function inviteUser(db: Db, input: InviteUserInput, actor: Actor, now: Date) {
  return db.transaction().execute(async (trx) => {
    const created = await insertUser(trx, input);
    if (!created) throw conflict(`${input.email} already has an account.`);
    const token = await issueToken(trx, created.id, 'invitation', INVITATION_TTL_HOURS, actor.id, now);
    await audit(trx, actor.id, 'invited', 'User', created.id, { email: input.email, roles: input.roles });
    return { user: created, token };
  });
}

/** Mails the invited person their one-time link (queued; retried by the mail queue). */
export async function mailInvitation(
  { db, config, queue }: Pick<Deps, 'db' | 'config' | 'queue'>,
  user: { name: string; email: string },
  token: string,
  invitedBy: string,
): Promise<void> {
  const { coopName } = await coopProfile(db);
  const link = `${config.publicUrl}/invitation?token=${token}`;
  await enqueueMail(queue, { to: user.email, ...invitationMail({ coopName, name: user.name, invitedBy, link }) });
}

/** The account an update names, or undefined. */
export async function findUserForUpdate(db: Db, id: string) {
  return findUserById(db, id);
}

/** Changes name, roles or activation; a deactivated account's sessions end in the same transaction. */
export async function updateUser(db: Db, targetId: string, input: UpdateUserInput, actor: Actor, now: Date) {
  const row = await db.transaction().execute(async (trx) => {
    const updated = await updateUserRow(trx, targetId, input, now);
    if (input.isActive === false) await endSessionsOf(trx, targetId);
    await audit(trx, actor.id, input.isActive === false ? 'deactivated' : 'updated', 'User', targetId, input);
    return updated;
  });
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    roles: row.roles,
    units: row.units,
    isActive: row.is_active,
    lastLoginAt: row.last_login_at?.toISOString() ?? null,
    createdAt: row.created_at.toISOString(),
  };
}
