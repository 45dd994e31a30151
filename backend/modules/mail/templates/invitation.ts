import type { MailContent } from './parts.ts';

/** The invitation to a new account: a one-time link to set a password. */
export function invitationMail(p: { coopName: string; name: string; invitedBy: string; link: string }): MailContent {
  return {
    subject: `You are invited to Cellarwright at ${p.coopName}`,
    text: `Hello ${p.name},\n\n${p.invitedBy} has invited you to Cellarwright, the back office of ${p.coopName}.\nSet your password here (the link works once, for seven days):\n\n${p.link}\n`,
  };
}
