import { ipKeyGenerator } from 'express-rate-limit';
import { sql } from 'kysely';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import { PgRateLimitStore } from '../../lib/rate-limit-store.ts';

export interface LoginRefusal {
  /** `address`: this address used up its tries for the account; `locked`: the account is locked everywhere. */
  reason: 'address' | 'locked';
  retryAfterSeconds: number;
}

const secondsUntil = (at: Date | undefined, fallbackMs: number) => Math.max(1, Math.ceil(((at?.getTime() ?? Date.now() + fallbackMs) - Date.now()) / 1000));

/**
 * Sign-in throttling that a stranger cannot turn against a member. Wrong passwords are counted per account
 * and address: after `LOGIN_LIMIT_PER_ACCOUNT` in `LOGIN_LIMIT_WINDOW_MINUTES` that address waits, while the
 * owner still signs in from anywhere else. Only `LOGIN_LOCK_PER_ACCOUNT` failures from all addresses together
 * within `LOGIN_LOCK_WINDOW_MINUTES` lock the account itself, for that long or until its owner follows the
 * unlock link e-mailed at that moment. The counters live in PostgreSQL (`rate_limit`), so every instance
 * shares them and a restart forgets none; their windows run on the database's clock.
 */
export class LoginThrottle {
  private readonly pairs: PgRateLimitStore;
  private readonly accounts: PgRateLimitStore;
  private readonly locks: PgRateLimitStore;
  private readonly pairLimit: number;
  private readonly lockAt: number;
  private readonly pairWindowMs: number;
  private readonly lockWindowMs: number;
  private lastPrune = 0;

  constructor(db: Database, config: Config) {
    this.pairWindowMs = config.LOGIN_LIMIT_WINDOW_MINUTES * 60_000;
    this.lockWindowMs = config.LOGIN_LOCK_WINDOW_MINUTES * 60_000;
    this.pairLimit = config.LOGIN_LIMIT_PER_ACCOUNT;
    this.lockAt = config.LOGIN_LOCK_PER_ACCOUNT;
    this.pairs = new PgRateLimitStore(db, 'login-pair:', this.pairWindowMs);
    this.accounts = new PgRateLimitStore(db, 'login-account:', this.lockWindowMs);
    this.locks = new PgRateLimitStore(db, 'login-lock:', this.lockWindowMs);
  }

  /** Before the password is checked: refuses while the account is locked or this address is out of tries; else counts the try. */
  async admit(email: string, ip: string | undefined): Promise<LoginRefusal | null> {
    const lock = await this.locks.get(email);
    if (lock) return { reason: 'locked', retryAfterSeconds: secondsUntil(lock.resetTime, this.lockWindowMs) };
    const pair = await this.pairs.increment(pairKey(email, ip));
    if (pair.totalHits > this.pairLimit) return { reason: 'address', retryAfterSeconds: secondsUntil(pair.resetTime, this.pairWindowMs) };
    return null;
  }

  /** After a wrong password: counts it against the account. True for the one failure that locked it. */
  async failed(email: string): Promise<boolean> {
    await this.pruneNowAndThen();
    const account = await this.accounts.increment(email);
    if (account.totalHits !== this.lockAt) return false;
    await this.locks.increment(email);
    return true;
  }

  /** The right password: this address starts afresh for the account. */
  async succeeded(email: string, ip: string | undefined): Promise<void> {
    await this.pairs.resetKey(pairKey(email, ip));
  }

  /** Lifts the lock and forgets the account's failures from every address; `db` may be the caller's transaction. */
  async unlock(db: Database, email: string): Promise<void> {
    await db
      .deleteFrom('rate_limit')
      .where((eb) =>
        eb.or([eb('key', 'in', [this.locks.prefix + email, this.accounts.prefix + email]), sql<boolean>`starts_with(key, ${this.pairs.prefix + email + ' '})`]),
      )
      .execute();
  }

  /** Every address and pair leaves a row; those whose window ended are deleted every few minutes. */
  private async pruneNowAndThen(): Promise<void> {
    if (Date.now() - this.lastPrune < 5 * 60_000) return;
    this.lastPrune = Date.now();
    await this.pairs.pruneExpired();
  }
}

/**
 * The address a limit counts: IPv6 grouped by its /56 network (one subscriber's block), and an IPv4 address
 * seen through a dual-stack socket (`::ffff:203.0.113.7`) as itself, not as part of one shared IPv6 block.
 */
export function clientAddressKey(ip: string | undefined): string {
  if (!ip) return 'unknown';
  const mapped = /^::ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(ip);
  return mapped ? mapped[1]! : ipKeyGenerator(ip);
}

// An e-mail address holds no space.
const pairKey = (email: string, ip: string | undefined) => `${email} ${clientAddressKey(ip)}`;
