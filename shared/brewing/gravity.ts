/**
 * Gravity scales: specific gravity, degrees Plato and Brix, and conversions between them (REFERENCE §2).
 */
import { BRIX_FIT_SG_MAX, BRIX_FIT_SG_MIN, EXTRACT_MAX, GRAVITY_MAX, GRAVITY_MIN, requireExtract, requireGravity, requireRange } from './validation.ts';

/** F2.1 without validation (internal). */
export function plato(sg: number): number {
  return -616.868 + 1111.14 * sg - 630.272 * sg * sg + 135.997 * sg * sg * sg;
}

/** F2.4 without validation (internal). */
function brix(sg: number): number {
  return ((182.4601 * sg - 775.6821) * sg + 1262.7794) * sg - 669.5622;
}

/**
 * Inverts a polynomial that is strictly increasing on [GRAVITY_MIN, GRAVITY_MAX] (true of F2.1
 * and F2.4: their derivatives stay above 180 per unit SG there) by bisection to 1e-12 in SG.
 */
function invertIncreasing(f: (sg: number) => number, target: number): number {
  let lo = GRAVITY_MIN;
  let hi = GRAVITY_MAX;
  for (let i = 0; i < 200 && hi - lo > 1e-12; i += 1) {
    const mid = (lo + hi) / 2;
    if (f(mid) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Specific gravity → degrees Plato by the ASBC polynomial, F2.1:
 * °P = −616.868 + 1111.14·S − 630.272·S² + 135.997·S³.
 * Accepts SG 0.980–1.200; below about 1.000 the result is negative (apparent extract of a
 * finished beer can be), and F2.1 gives −0.003 °P at exactly 1.000.
 */
export function sgToPlato(sg: number): number {
  requireGravity('sg', sg);
  return plato(sg);
}

/**
 * Degrees Plato (0–40) → specific gravity: numerical inverse of F2.1 (F2.1⁻¹, bisection;
 * the result reproduces the input through F2.1 to better than 1e-9 °P).
 */
export function platoToSg(p: number): number {
  requireExtract('plato', p, '°P');
  return invertIncreasing(plato, p);
}

/** Apparent extract accepted by {@link apparentPlatoToSg}: F2.1 over SG 0.980–1.200 spans about −5.26 to 43.9 °P. */
const APPARENT_EXTRACT_MIN = -5;

/**
 * Apparent extract in °P (−5 to 40) → specific gravity: the numerical inverse of F2.1 like
 * {@link platoToSg}, but also below 0 °P, where a hydrometer or digital hydrometer scaled in °P
 * reads a dry finished beer (F2.1 gives −2.61 °P at SG 0.990).
 */
export function apparentPlatoToSg(p: number): number {
  requireRange('plato', p, APPARENT_EXTRACT_MIN, EXTRACT_MAX, '°P');
  return invertIncreasing(plato, p);
}

/**
 * Degrees Brix (0–40) → specific gravity: numerical inverse of the NBS-table fit F2.4,
 * °Bx = 182.4601·S³ − 775.6821·S² + 1262.7794·S − 669.5622 (fit range S 1.00000–1.17874).
 */
export function brixToSg(brixValue: number): number {
  requireExtract('brix', brixValue, '°Bx');
  return invertIncreasing(brix, brixValue);
}

/** Gravity scales understood by {@link convertGravity}. */
export type GravityScale = 'sg' | 'plato' | 'brix';

/**
 * Converts between specific gravity, °Plato and °Brix. SG ↔ °P uses F2.1 / F2.1⁻¹, SG ↔ °Bx uses
 * F2.4 / its inverse, and °P ↔ °Bx goes through SG. Inputs: SG 0.980–1.200 (1.000–1.17874 when
 * converting SG to Brix, F2.4's fit range), °P and °Bx 0–40. In the wort range the two scales agree
 * within about 0.001; the fits drift apart at high extract (40 °P converts to about 40.11 °Bx).
 */
export function convertGravity(value: number, from: GravityScale, to: GravityScale): number {
  let sg: number;
  switch (from) {
    case 'sg':
      requireGravity('value', value);
      if (to === 'brix') {
        requireRange('value', value, BRIX_FIT_SG_MIN, BRIX_FIT_SG_MAX, '(specific gravity, F2.4 fit range)', 5);
      }
      sg = value;
      break;
    case 'plato':
      requireExtract('value', value, '°P');
      sg = invertIncreasing(plato, value);
      break;
    case 'brix':
      requireExtract('value', value, '°Bx');
      sg = invertIncreasing(brix, value);
      break;
    default:
      throw new RangeError(`from must be 'sg', 'plato' or 'brix'; got ${String(from)}`);
  }
  switch (to) {
    case 'sg':
      return from === 'sg' ? value : sg;
    case 'plato':
      return from === 'plato' ? value : plato(sg);
    case 'brix':
      return from === 'brix' ? value : brix(sg);
    default:
      throw new RangeError(`to must be 'sg', 'plato' or 'brix'; got ${String(to)}`);
  }
}
