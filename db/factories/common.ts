import { hash } from '@node-rs/argon2';
import type { Database } from '../../backend/db/database.ts';

/** The password every factory-made account signs in with unless told otherwise (the demo's password). */
export const DEMO_PASSWORD = 'cellar-demo';

/**
 * The instant used where a record needs a time nobody asked about (an account's or an item's
 * registration): long before any test's day, and fixed, so that factories never read the clock.
 */
export const LONG_AGO = new Date('2026-01-01T09:00:00Z');

export const MINUTE = 60_000;
export const HOUR = 60 * MINUTE;
export const DAY = 24 * HOUR;

/** A point in time as the factories accept it. */
export type At = Date | string;

export function toDate(at: At, what = 'time'): Date {
  const d = at instanceof Date ? new Date(at.getTime()) : new Date(at);
  if (Number.isNaN(d.getTime())) throw new Error(`factories: ${what} is not a time: ${String(at)}`);
  return d;
}

export const addMs = (at: At, ms: number) => new Date(toDate(at).getTime() + ms);

/** Noon UTC of a day ('YYYY-MM-DD'): the instant a record dated only by its day is stamped with. */
export const noonOf = (day: string) => new Date(`${day}T12:00:00Z`);

let counter = 1000;
/** A number unique within this process (codes and e-mails of factory-made records never collide with the fixture's). */
export function nextSeq(): number {
  counter += 1;
  if (counter > 9999) counter = 1001;
  return counter;
}

/** Runs `fn` in the caller's transaction, or in a new one when given the plain database. */
export function inTransaction<T>(db: Database, fn: (trx: Database) => Promise<T>): Promise<T> {
  return db.isTransaction ? fn(db) : db.transaction().execute(fn);
}

let demoHash: Promise<string> | null = null;
/** One hash of the demo password per process, as the demo seed does: sign-in with it works. */
export function demoPasswordHash(): Promise<string> {
  demoHash ??= hash(DEMO_PASSWORD);
  return demoHash;
}
