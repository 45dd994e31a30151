/** Whether `tz` names a time zone this platform knows (an IANA name like Europe/Dublin, or UTC). */
export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}
