import { describe, expect, it } from 'vitest';
import { parseMoneyInput } from '../money-input.ts';

describe('money typed by the treasurer', () => {
  it('reads decimals with a point or a comma, currency signs and thousands separators', () => {
    expect(parseMoneyInput('12.50')).toBe(1250);
    expect(parseMoneyInput('12,5')).toBe(1250);
    expect(parseMoneyInput('€ 1,234.56')).toBe(123_456);
    expect(parseMoneyInput('1.234,56')).toBe(123_456);
    expect(parseMoneyInput('7')).toBe(700);
    expect(parseMoneyInput('-5')).toBe(-500);
    expect(parseMoneyInput('EUR 0.05')).toBe(5);
  });

  it('refuses what is not an amount', () => {
    expect(parseMoneyInput('')).toBeNaN();
    expect(parseMoneyInput('12.505')).toBeNaN();
    expect(parseMoneyInput('ten')).toBeNaN();
    expect(parseMoneyInput(undefined)).toBeNaN();
  });
});
