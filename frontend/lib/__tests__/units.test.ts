import { describe, expect, it } from 'vitest';
import { fromDisplay, toDisplay } from '@/lib/units';

describe('display units', () => {
  it('shows metric volumes, temperatures, lengths and masses as the API gives them, and pressure in bar', () => {
    expect(toDisplay.volume(19, 'metric')).toBe(19);
    expect(toDisplay.temperature(-2, 'metric')).toBe(-2);
    expect(toDisplay.mass(5, 'metric')).toBe(5);
    expect(toDisplay.pressure(100, 'metric')).toBeCloseTo(1, 6);
    expect(fromDisplay.pressure(1, 'metric')).toBeCloseTo(100, 6);
  });

  it('converts to US units and back, carrying the sign of a linear quantity', () => {
    // 1 US gallon = 3.785411784 L (exact by definition); 1 psi = 6.894757 kPa.
    expect(toDisplay.volume(-3.785411784, 'us')).toBeCloseTo(-1, 9);
    expect(fromDisplay.volume(2, 'us')).toBeCloseTo(7.570823568, 9);
    expect(toDisplay.temperature(100, 'us')).toBeCloseTo(212, 9);
    expect(toDisplay.pressure(6.894757, 'us')).toBeCloseTo(1, 6);
    expect(fromDisplay.smallLength(1, 'us')).toBeCloseTo(25.4, 9);
  });

  it('gives NaN for what no quantity can be', () => {
    expect(toDisplay.temperature(-300, 'us')).toBeNaN();
    expect(fromDisplay.temperature(-500, 'us')).toBeNaN();
    expect(toDisplay.volume(Number.NaN, 'us')).toBeNaN();
  });
});
