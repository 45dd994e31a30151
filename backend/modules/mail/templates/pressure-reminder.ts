import { defaultLocale, formatNumber, formatPressure } from '../../../../shared/format/index.ts';

export interface PressureReminderMail {
  recipientName: string;
  kegCode: string;
  /** The tap the keg is on, if any. */
  tapCode: string | null;
  fastPressureKpa: number;
  servingPressureKpa: number;
}

/** The e-mail to the brewers on duty at the end of a fast start: turn the regulator down to serving pressure. */
export function pressureReminder(m: PressureReminderMail): { subject: string; text: string } {
  const where = m.tapCode ? ` (on tap ${m.tapCode})` : '';
  const ctx = { locale: defaultLocale };
  const bar = formatPressure(m.servingPressureKpa, { ...ctx, units: 'metric' });
  const psi = formatPressure(m.servingPressureKpa, { ...ctx, units: 'us' });
  const kpa = (v: number) => `${formatNumber(v, 0, ctx)} kPa`;
  return {
    subject: `Lower the pressure on keg ${m.kegCode} to ${bar} (${psi})`,
    text:
      `Hello ${m.recipientName},\n\nThe fast start on keg ${m.kegCode}${where} at ${kpa(m.fastPressureKpa)} has run its time.\n` +
      `Turn the regulator down to serving pressure: ${kpa(m.servingPressureKpa)} (${bar}, ${psi}), ` +
      `vent the headspace to that pressure, and mark the plan "pressure lowered" in Cellarwright.\n\n` +
      `Do not shake the keg at high pressure: that easily over-carbonates. Never exceed the keg's or regulator's rated pressure; ` +
      `CO2 displaces air in the closed cold room, so keep it ventilated and heed its CO2 alarm. Local codes and licensed practice govern.\n`,
  };
}
