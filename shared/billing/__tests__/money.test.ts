import { describe, expect, it } from 'vitest';
import { addDays, dateSpan, daysBetween, periodBounds, todayIn } from '../dates.ts';
import { centsToDecimal, divRoundHalfUp, lineAmountCents, priceLine, splitGross, sumLines, taxCents, toMilli } from '../money.ts';

describe('half-up rounding, per line', () => {
  it('rounds halves away from zero and everything else to the nearest cent', () => {
    expect(divRoundHalfUp(25, 10)).toBe(3); // 2.5 → 3
    expect(divRoundHalfUp(-25, 10)).toBe(-3); // −2.5 → −3, so a credit mirrors its charge
    expect(divRoundHalfUp(24_999, 10_000)).toBe(2); // 2.4999 → 2
    expect(divRoundHalfUp(15, 10)).toBe(2);
    expect(divRoundHalfUp(14, 10)).toBe(1);
    expect(divRoundHalfUp(0, 7)).toBe(0);
    expect(Object.is(divRoundHalfUp(-4, 10), -0)).toBe(false); // never a negative zero
  });

  it('prices a line as quantity × unit price, rounded once', () => {
    // 0.125 kg of CO2 at 3.80/kg = 47.5 cents → 48
    expect(lineAmountCents(0.125, 380)).toBe(48);
    // 14 fermenter-days at 2.75 = 38.50 exactly
    expect(lineAmountCents(14, 275)).toBe(3850);
    // 2.333 weeks at 2.00 = 466.6 cents → 467
    expect(lineAmountCents(2.333, 200)).toBe(467);
    expect(() => toMilli(1.0005)).toThrow(/three decimals/);
  });

  it('taxes each line on its own and adds the lines’ tax, never re-rounding the total', () => {
    // Three lines of 0.20 at 7.5 %: each line's tax is 1.5 cents → 2, so the invoice's tax is 6 cents,
    // where taxing the 0.60 subtotal once would have given 4.5 → 5.
    const lines = [20, 20, 20].map((c) => priceLine({ quantity: 1, unitPriceCents: c, taxRateBp: 750 }));
    expect(lines.map((l) => l.taxCents)).toEqual([2, 2, 2]);
    expect(sumLines(lines)).toEqual({ subtotalCents: 60, taxCents: 6, totalCents: 66 });
    expect(taxCents(60, 750)).toBe(5);
    // A zero rate is allowed and taxes nothing.
    expect(taxCents(12_345, 0)).toBe(0);
    // 8 % of 1.55 = 12.4 cents → 12; of 1.57 = 12.56 → 13
    expect(taxCents(155, 800)).toBe(12);
    expect(taxCents(157, 800)).toBe(13);
  });

  it('splits a tax-inclusive refund into net (rounded half-up) and tax (the rest)', () => {
    expect(splitGross(1080, 800)).toEqual({ netCents: 1000, taxCents: 80 });
    // 10.00 at 8 %: net 925.925… → 926, tax 74
    expect(splitGross(1000, 800)).toEqual({ netCents: 926, taxCents: 74 });
    expect(splitGross(999, 0)).toEqual({ netCents: 999, taxCents: 0 });
  });

  it('writes cents as plain decimals for the accountant', () => {
    expect(centsToDecimal(123_456)).toBe('1234.56');
    expect(centsToDecimal(-5)).toBe('-0.05');
    expect(centsToDecimal(0)).toBe('0.00');
  });
});

describe('calendar dates and periods', () => {
  it('knows each month’s bounds, leap years included', () => {
    expect(periodBounds('2026-11')).toEqual({ first: '2026-11-01', last: '2026-11-30', next: '2026-12-01' });
    expect(periodBounds('2028-02')).toEqual({ first: '2028-02-01', last: '2028-02-29', next: '2028-03-01' });
    expect(periodBounds('2026-12').next).toBe('2027-01-01');
  });

  it('counts days across month and daylight-saving boundaries', () => {
    expect(daysBetween('2026-11-12', '2026-11-26')).toBe(14);
    expect(daysBetween('2026-10-28', '2026-11-05')).toBe(8);
    expect(daysBetween('2026-03-28', '2026-03-30')).toBe(2);
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
  });

  it('names spans the way invoice lines do', () => {
    expect(dateSpan('2026-11-12', '2026-11-26')).toBe('12–26 Nov');
    expect(dateSpan('2026-10-28', '2026-11-01')).toBe('28 Oct–1 Nov');
    expect(dateSpan('2026-11-03', '2026-11-03')).toBe('3 Nov');
  });

  it('takes today in the co-op’s time zone', () => {
    const lateEvening = new Date('2026-11-30T23:30:00Z');
    expect(todayIn('UTC', lateEvening)).toBe('2026-11-30');
    expect(todayIn('Europe/Berlin', lateEvening)).toBe('2026-12-01');
  });
});
