import { describe, expect, it } from 'vitest';
import {
  createFormatter,
  formatAbv,
  formatDate,
  formatDateTime,
  formatDayMonth,
  formatMoney,
  formatMonth,
  formatPressure,
  formatTemperature,
  formatTime,
  formatVolume,
} from '../index.ts';

// Intl separates some parts with no-break or narrow no-break spaces; compare on plain spaces.
const plain = (s: string) => s.replace(/[\u00a0\u202f]/g, ' ');

describe('dates and times', () => {
  const gb = { locale: 'en-GB', timeZone: 'Europe/Berlin' };

  it('shows an instant in the co-op time zone, across the spring change of clocks', () => {
    // Europe/Berlin leaves CET (UTC+1) for CEST (UTC+2) at 01:00 UTC on 29 March 2026.
    expect(plain(formatDateTime('2026-03-29T00:30:00.000Z', gb))).toBe('29 Mar 2026, 01:30');
    expect(plain(formatDateTime('2026-03-29T01:30:00.000Z', gb))).toBe('29 Mar 2026, 03:30');
    expect(formatTime('2026-03-29T01:30:00.000Z', gb)).toBe('03:30');
  });

  it('and across the autumn change, when one wall-clock hour happens twice', () => {
    // Back from CEST to CET at 01:00 UTC on 25 October 2026: 00:30 and 01:30 UTC both read 02:30.
    expect(formatTime('2026-10-25T00:30:00Z', gb)).toBe('02:30');
    expect(formatTime('2026-10-25T01:30:00Z', gb)).toBe('02:30');
    expect(formatTime('2026-10-25T02:30:00Z', gb)).toBe('03:30');
  });

  it('puts an instant on the day it is in the co-op, not in UTC', () => {
    expect(formatDate('2026-12-03T23:30:00Z', { locale: 'en-GB', timeZone: 'Europe/Berlin' })).toBe('4 Dec 2026');
    expect(formatDate('2026-12-03T03:30:00Z', { locale: 'en-GB', timeZone: 'America/Los_Angeles' })).toBe('2 Dec 2026');
  });

  it('never shifts a calendar day, whatever the zone', () => {
    expect(formatDate('2026-12-03', { locale: 'en-GB', timeZone: 'Pacific/Kiritimati' })).toBe('3 Dec 2026');
    expect(formatDate('2026-12-03', { locale: 'en-GB', timeZone: 'Pacific/Pago_Pago' })).toBe('3 Dec 2026');
    expect(formatDateTime('2026-12-03', { locale: 'en-GB', timeZone: 'Pacific/Pago_Pago' })).toBe('3 Dec 2026');
  });

  it('follows the reader locale in one style', () => {
    const at = '2026-12-03T14:00:00.000Z';
    expect(plain(formatDateTime(at, { locale: 'en-US', timeZone: 'America/New_York' }))).toBe('Dec 3, 2026, 9:00 AM');
    expect(formatDate(at, { locale: 'de-DE', timeZone: 'Europe/Berlin' })).toBe('03.12.2026');
    expect(formatDate(at, { locale: 'en-GB', timeZone: 'UTC' })).toBe('3 Dec 2026');
    expect(formatDayMonth(at, { locale: 'en-GB', timeZone: 'UTC' })).toBe('3 Dec');
    expect(formatDayMonth(at, { locale: 'en-US', timeZone: 'UTC' })).toBe('Dec 3');
  });

  it('never shows a raw timestamp', () => {
    const shown = formatDateTime('2026-12-03T14:00:00.000Z', { locale: 'en-GB', timeZone: 'UTC' });
    expect(shown).not.toMatch(/T\d\d:|Z$|\.000/);
    expect(plain(shown)).toBe('3 Dec 2026, 14:00');
  });

  it('names months', () => {
    expect(formatMonth('2026-12', { locale: 'en-GB', timeZone: 'Pacific/Pago_Pago' })).toBe('December 2026');
    expect(formatMonth('2026-12', { locale: 'en-GB' }, 'short')).toBe('Dec 26');
  });

  it('shows missing and unreadable values as a dash', () => {
    expect(formatDate(null)).toBe('—');
    expect(formatDateTime(undefined)).toBe('—');
    expect(formatDate('not a date')).toBe('—');
    expect(formatDate('', {}, 'never')).toBe('never');
  });

  it('falls back to the runtime zone for an unknown one rather than failing', () => {
    expect(formatDate('2026-12-03T12:00:00Z', { locale: 'en-GB', timeZone: 'Mars/Olympus' })).toMatch(/^[234] Dec 2026$/);
  });
});

describe('money', () => {
  it('formats cents exactly in the reader locale and currency', () => {
    expect(formatMoney(123_450, 'EUR', { locale: 'en-GB' })).toBe('€1,234.50');
    expect(plain(formatMoney(123_450, 'EUR', { locale: 'de-DE' }))).toBe('1.234,50 €');
    expect(formatMoney(-1205, 'USD', { locale: 'en-US' })).toBe('-$12.05');
    expect(formatMoney(99, 'GBP', { locale: 'en-GB' })).toBe('£0.99');
    expect(plain(formatMoney(500_000, 'JPY', { locale: 'en-GB' }))).toBe('JP¥5,000.00');
  });

  it('uses the co-op locale by default and says the code of a currency Intl does not know', () => {
    expect(formatMoney(1000, 'EUR')).toBe('€10.00');
    expect(formatMoney(-5, 'XX1')).toBe('-XX1 0.05');
    expect(formatMoney(null, 'EUR')).toBe('—');
  });
});

describe('quantities in the person units', () => {
  const us = { locale: 'en-US', units: 'us' as const };
  const metric = { locale: 'en-GB', units: 'metric' as const };

  it('shows volumes in litres or US gallons', () => {
    expect(formatVolume(20, metric)).toBe('20.0 L');
    expect(formatVolume(18.92705892, us)).toBe('5.00 gal'); // 5 US gal = 18.92705892 L exactly
    expect(formatVolume(1234.5, { locale: 'de-DE', units: 'metric' })).toBe('1.234,5 L');
  });

  it('shows temperatures in °C or °F', () => {
    expect(formatTemperature(12, metric)).toBe('12.0 °C');
    expect(formatTemperature(100, us)).toBe('212.0 °F');
    expect(formatTemperature(-40, us)).toBe('-40.0 °F');
  });

  it('shows gauge pressure in bar or psi', () => {
    expect(formatPressure(83, metric)).toBe('0.83 bar');
    expect(formatPressure(6.894757293168361 * 12, us)).toBe('12.0 psi');
  });

  it('binds one reader in a formatter', () => {
    const f = createFormatter({ locale: 'en-US', timeZone: 'America/Chicago', units: 'us' });
    expect(f.volume(3.785411784)).toBe('1.00 gal');
    expect(plain(f.dateTime('2026-07-01T17:00:00Z'))).toBe('Jul 1, 2026, 12:00 PM');
    expect(f.money(2500, 'USD')).toBe('$25.00');
  });

  it('names the ABV method with every ABV', () => {
    expect(formatAbv(5.234, { locale: 'en-GB' })).toBe('5.2 % ABV (ASBC/Balling)');
    expect(formatAbv(null)).toBe('—');
  });
});
