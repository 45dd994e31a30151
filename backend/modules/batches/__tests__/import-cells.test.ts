import { describe, expect, it } from 'vitest';
import { CellError, detectDateOrder, parseNumber, parseTakenAt, parseTemperature, parseUnit, proposeMapping, zonedTime } from '../import-cells.ts';
import { columnLetter, detectDelimiter } from '../import-file.ts';

const iso = (ms: number) => new Date(ms).toISOString();

describe('numbers as spreadsheets and hydrometer exports write them', () => {
  it('reads decimal points, decimal commas, signs, exponents and a trailing unit', () => {
    expect(parseNumber('1.048')).toEqual({ value: 1.048, suffix: '' });
    expect(parseNumber('1,048')).toEqual({ value: 1.048, suffix: '' });
    expect(parseNumber(' -0,5 ')).toEqual({ value: -0.5, suffix: '' });
    expect(parseNumber('12.5 °P')).toEqual({ value: 12.5, suffix: '°P' });
    expect(parseNumber('1.05e0')).toEqual({ value: 1.05, suffix: '' });
    expect(parseNumber(19.5)).toEqual({ value: 19.5, suffix: '' });
    expect(parseNumber('')).toBeNull();
    expect(parseNumber(null)).toBeNull();
  });

  it('refuses what is not one number', () => {
    for (const bad of ['1.0x4', 'abc', '1.048.2', '1,2,3', '--1']) expect(() => parseNumber(bad), bad).toThrow(CellError);
    expect(() => parseNumber(true)).toThrow(/not a number/i);
  });

  it('reads gravity units and temperatures in either scale', () => {
    expect(parseUnit('SG')).toBe('sg');
    expect(parseUnit('°P')).toBe('plato');
    expect(parseUnit('Plato')).toBe('plato');
    expect(parseUnit('°Bx')).toBe('brix');
    expect(parseUnit('')).toBeNull();
    expect(() => parseUnit('Oechsle')).toThrow(/unknown unit/i);
    expect(parseTemperature('68', 'f')).toBe(20);
    expect(parseTemperature('68 °F', 'c')).toBe(20);
    expect(parseTemperature('19,5', 'c')).toBe(19.5);
    expect(() => parseTemperature('150', 'c')).toThrow(/outside/);
  });
});

describe('times of readings', () => {
  it('reads ISO 8601 with and without an offset', () => {
    expect(iso(parseTakenAt('2026-10-03T14:05:00Z', 'dmy', 'Europe/Berlin'))).toBe('2026-10-03T14:05:00.000Z');
    expect(iso(parseTakenAt('2026-10-03T14:05:00+02:00', 'dmy', 'UTC'))).toBe('2026-10-03T12:05:00.000Z');
    expect(iso(parseTakenAt('2026-10-03 14:05', 'dmy', 'Europe/Berlin'))).toBe('2026-10-03T12:05:00.000Z'); // CEST, UTC+2
    expect(iso(parseTakenAt('2026-11-03 14:05', 'dmy', 'Europe/Berlin'))).toBe('2026-11-03T13:05:00.000Z'); // CET, UTC+1
    expect(iso(parseTakenAt('2026-10-03', 'dmy', 'UTC'))).toBe('2026-10-03T00:00:00.000Z');
  });

  it('reads day-first and month-first dates, with a.m./p.m.', () => {
    expect(iso(parseTakenAt('03.10.2026 14:05', 'dmy', 'UTC'))).toBe('2026-10-03T14:05:00.000Z');
    expect(iso(parseTakenAt('10/03/2026 2:05 PM', 'mdy', 'UTC'))).toBe('2026-10-03T14:05:00.000Z');
    expect(iso(parseTakenAt('10/03/2026 12:30 am', 'mdy', 'UTC'))).toBe('2026-10-03T00:30:00.000Z');
    expect(iso(parseTakenAt('03/10/26 08:00', 'dmy', 'UTC'))).toBe('2026-10-03T08:00:00.000Z');
    expect(detectDateOrder(['03/10/2026', '25/10/2026'])).toBe('dmy');
    expect(detectDateOrder(['10/03/2026', '10/25/2026'])).toBe('mdy');
    expect(detectDateOrder(['2026/10/03'])).toBe('ymd');
  });

  it('reads Excel date serials, epoch seconds and milliseconds, and spreadsheet dates', () => {
    // 46298 is 2026-10-03 in Excel's 1900 date system (days since 1899-12-30).
    expect(iso(parseTakenAt(46298.5, 'dmy', 'UTC'))).toBe('2026-10-03T12:00:00.000Z');
    expect(iso(parseTakenAt('46298,25', 'dmy', 'UTC'))).toBe('2026-10-03T06:00:00.000Z');
    expect(iso(parseTakenAt(1791000000, 'dmy', 'UTC'))).toBe(new Date(1791000000 * 1000).toISOString());
    expect(iso(parseTakenAt(1791000000123, 'dmy', 'UTC'))).toBe(new Date(1791000000123).toISOString());
    expect(iso(parseTakenAt(new Date(Date.UTC(2026, 9, 3, 14, 5)), 'dmy', 'America/Chicago'))).toBe('2026-10-03T19:05:00.000Z');
  });

  it('refuses impossible and unreadable dates with a reason', () => {
    expect(() => parseTakenAt('2026-02-30 08:00', 'dmy', 'UTC')).toThrow(/no day 30/);
    expect(() => parseTakenAt('2026-13-01', 'dmy', 'UTC')).toThrow(/no month 13/);
    expect(() => parseTakenAt('2026-10-03 25:00', 'dmy', 'UTC')).toThrow(/no time/);
    expect(() => parseTakenAt('next tuesday', 'dmy', 'UTC')).toThrow(/cannot read/i);
    expect(() => parseTakenAt('', 'dmy', 'UTC')).toThrow(/missing/);
  });

  it('turns wall-clock time into an instant across a daylight-saving change', () => {
    // Europe/Berlin leaves summer time at 03:00 CEST on 2026-10-25.
    expect(iso(zonedTime(2026, 10, 25, 1, 30, 0, 0, 'Europe/Berlin'))).toBe('2026-10-24T23:30:00.000Z');
    expect(iso(zonedTime(2026, 10, 25, 4, 0, 0, 0, 'Europe/Berlin'))).toBe('2026-10-25T03:00:00.000Z');
  });
});

describe('reading the file’s shape', () => {
  it('finds the delimiter of the header line outside quotes', () => {
    expect(detectDelimiter('a,b,c\n1,2,3')).toBe(',');
    expect(detectDelimiter('Datum;Gravity;Note\n03.10.2026;1,048;x')).toBe(';');
    expect(detectDelimiter('Time\tSG\n')).toBe('\t');
    expect(detectDelimiter('"a;b",c\n')).toBe(',');
    expect(detectDelimiter('\n\nonly\n')).toBe(',');
  });

  it('names columns like a spreadsheet', () => {
    expect([0, 25, 26, 27, 701, 702].map(columnLetter)).toEqual(['A', 'Z', 'AA', 'AB', 'ZZ', 'AAA']);
  });

  it('proposes a mapping from the header names', () => {
    expect(proposeMapping(['Timestamp', 'Specific gravity', 'Temp (°C)', 'Comment'])).toEqual({
      mapping: { takenAt: 'Timestamp', gravity: 'Specific gravity', temperature: 'Temp (°C)', note: 'Comment', gravityUnit: 'sg', temperatureUnit: 'c' },
      complete: true,
    });
    expect(proposeMapping(['Date', 'Plato', 'Temp F']).mapping).toMatchObject({
      takenAt: 'Date',
      gravity: 'Plato',
      gravityUnit: 'plato',
      temperatureUnit: 'f',
    });
    expect(proposeMapping(['Taken at', 'Gravity', 'Unit']).mapping).toMatchObject({ unit: 'Unit' });
    expect(proposeMapping(['foo', 'bar']).complete).toBe(false);
  });
});
