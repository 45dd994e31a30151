import { expect } from 'vitest';
import { fahrenheitToCelsius, kpaToPsi } from '../index.ts';

/** Asserts |actual − expected| ≤ tol (the tolerances are the ones REFERENCE.md gives). */
export function near(actual: number, expected: number, tol: number): void {
  expect(Number.isFinite(actual)).toBe(true);
  expect(Math.abs(actual - expected), `expected ${actual} to be within ±${tol} of ${expected}`).toBeLessThanOrEqual(tol + 1e-12);
}

export const psi = (kpa: number): number => kpaToPsi(kpa);
export const fToC = (f: number): number => fahrenheitToCelsius(f);
/** One US fluid ounce in litres (1/128 US gallon). */
export const US_FLUID_OUNCE_L = 3.785411784 / 128;
