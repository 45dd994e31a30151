import { createHash, randomBytes } from 'node:crypto';
import { hash, verify } from '@node-rs/argon2';
import type { Role } from '../../../shared/permissions/roles.ts';
import type { Database } from '../../db/database.ts';
import type { AppUserRow } from '../../db/schema.ts';
import { gone, notFound } from '../../lib/http-problem.ts';
import {
  deleteSessionsOf,
  findActiveSessionUser,
  findTokenByHash,
  findUserByEmail,
  insertToken,
  markTokenUsed,
  retireUnusedTokens,
  type TokenPurpose,
} from './auth.repository.ts';

export type { TokenPurpose };

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
  const row = await findUserByEmail(db, email.toLowerCase());
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
  const row = await findActiveSessionUser(db, id);
  return row ? toSessionUser(row) : null;
}

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

const tokenLabels: Record<TokenPurpose, string> = { invitation: 'Invitation', password_reset: 'Reset link', account_unlock: 'Unlock link' };

/** A single-use token issued at the clock's `now` and valid for `ttlHours`; only its hash is stored. Returns the token to put in the link. */
export async function issueToken(db: Database, userId: string, purpose: TokenPurpose, ttlHours: number, createdBy: string | null, now: Date): Promise<string> {
  const token = randomBytes(32).toString('base64url');
  // A newer link replaces older unused ones of the same kind.
  await retireUnusedTokens(db, userId, purpose, now);
  await insertToken(db, { userId, purpose, tokenHash: sha256(token), expiresAt: new Date(now.getTime() + ttlHours * 3600_000), createdBy });
  return token;
}

async function findToken(db: Database, token: string, purpose: TokenPurpose, lock: boolean, now: Date) {
  const row = await findTokenByHash(db, sha256(token), purpose, lock);
  const label = tokenLabels[purpose];
  if (!row || !row.is_active) throw notFound(label);
  if (row.used_at) throw gone(`${label} has already been used.`);
  if (new Date(row.expires_at) <= now) throw gone(`${label} has expired.`);
  return row;
}

/** The token's row if it may still be used at `now`, without using it. */
export const peekToken = (db: Database, token: string, purpose: TokenPurpose, now: Date) => findToken(db, token, purpose, false, now);

/** Marks the token used at `now` and returns its row; call inside the transaction that acts on it. */
export async function consumeToken(db: Database, token: string, purpose: TokenPurpose, now: Date) {
  const row = await findToken(db, token, purpose, true, now);
  await markTokenUsed(db, row.id, now);
  return row;
}

/** Ends every session of a user (deactivation, password change). */
export async function endSessionsOf(db: Database, userId: string, exceptSid?: string): Promise<void> {
  await deleteSessionsOf(db, userId, exceptSid);
}
