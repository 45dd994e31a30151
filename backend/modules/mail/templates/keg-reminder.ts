import { formatWhen, type MailContent } from './parts.ts';

/** To a member who has a keg out past its due time: bring it back, safely. */
export function kegReminderMail(p: {
  coopName: string;
  appUrl: string;
  timeZone: string;
  memberName: string;
  keg: { id: string; code: string; name: string; dueAt: Date; checkedOutAt: Date | null };
}): MailContent {
  const { keg, timeZone } = p;
  return {
    subject: `Reminder: keg ${keg.code} was due back ${formatWhen(keg.dueAt, timeZone)}`,
    text: [
      `Hello ${p.memberName},`,
      '',
      `Keg ${keg.code} (${keg.name}) went out with you${keg.checkedOutAt ? ` on ${formatWhen(keg.checkedOutAt, timeZone)}` : ''} and was due back at the cellar ${formatWhen(keg.dueAt, timeZone)}.`,
      'Please bring it back, or tell the brewer on duty when you will: other members are waiting for kegs.',
      'Release the pressure before you carry it, and keep it upright.',
      '',
      `${p.appUrl}/kegs/${keg.id}`,
      '',
      p.coopName,
    ].join('\n'),
  };
}
