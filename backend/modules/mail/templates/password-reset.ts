import type { MailContent } from './parts.ts';

/** The password-reset link, valid once for one hour. */
export function passwordResetMail(p: { coopName: string; name: string; link: string }): MailContent {
  return {
    subject: 'Reset your Cellarwright password',
    text: `Hello ${p.name},\n\nSomeone asked to reset the password of your Cellarwright account at ${p.coopName}.\nChoose a new password here (the link works once, for one hour):\n\n${p.link}\n\nIf it was not you, ignore this e-mail; your password stays as it is.\n`,
  };
}
