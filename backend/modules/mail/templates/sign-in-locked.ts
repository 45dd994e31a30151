import type { MailContent } from './parts.ts';

/** To the owner of an account locked after many failed sign-ins: a one-time link that lifts the lock. */
export function signInLockedMail(p: { coopName: string; name: string; failures: number; lockMinutes: number; link: string; linkHours: number }): MailContent {
  return {
    subject: 'Unlock your Cellarwright account',
    text: `Hello ${p.name},\n\nThere have been ${p.failures} failed attempts to sign in to your Cellarwright account at ${p.coopName}, so sign-in to it is locked for ${p.lockMinutes} minutes.\nUnlock it here (the link works once, for ${p.linkHours} hours):\n\n${p.link}\n\nIf the attempts were not yours, someone may be guessing your password: after unlocking, consider choosing a new one ("Forgot password?" on the sign-in page).\n`,
  };
}
