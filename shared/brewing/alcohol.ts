/**
 * Attenuation, extract and alcohol from original and final gravity (REFERENCE §4).
 */
import { plato } from './gravity.ts';
import { requireGravity } from './validation.ts';

/** Validates an OG/FG pair for attenuation and alcohol: both gravities, og above 1.000, fg ≤ og. */
function requireGravityPair(og: number, fg: number): { oe: number; ae: number } {
  requireGravity('og', og);
  requireGravity('fg', fg);
  if (fg > og) {
    throw new RangeError(`fg must not exceed og (fg ${fg} > og ${og})`);
  }
  const oe = plato(og);
  if (!(oe > 0)) {
    throw new RangeError(`og must be above 1.000 so that the original extract is above 0 °P; got ${og}`);
  }
  return { oe, ae: plato(fg) };
}

/** F4.2 without validation (internal), °P. */
function balling(oe: number, ae: number): number {
  return 0.1808 * oe + 0.8192 * ae;
}

/** F4.4 without validation (internal), % w/w. */
function abwFromExtracts(oe: number, re: number): number {
  return (oe - re) / (2.0665 - 0.010665 * oe);
}

/**
 * Apparent degree of fermentation in %, F4.1 on °Plato: ADF = 100·(OE − AE)/OE, with OE and AE
 * from og and fg by F2.1. (The SG form 100·(OG − FG)/(OG − 1) reads about 0.7 point higher.)
 */
export function apparentAttenuation(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  return (100 * (oe - ae)) / oe;
}

/** Real extract in °P by the Balling relation, F4.2: RE = 0.1808·OE + 0.8192·AE (OE, AE by F2.1). */
export function realExtract(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  return balling(oe, ae);
}

/** Alcohol by weight (% w/w), F4.4: A = (OE − RE)/(2.0665 − 0.010665·OE), RE by F4.2. */
export function alcoholByWeight(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  return abwFromExtracts(oe, balling(oe, ae));
}

/** Densities at 20 °C used by F4.6 (kg/m³; values from memory, REFERENCE §4 tags them [M]). */
const ETHANOL_DENSITY_20C = 789.24;
const WATER_DENSITY_20C = 998.2;

/**
 * The ABV method {@link abv} uses, named wherever an ABV is shown (screens, PDFs, exports): the
 * density form of the Balling relations (F4.6 from F4.4 and F4.2), not the 131 × (OG − FG) shortcut.
 */
export const abvMethod = { id: 'F4.6', name: 'ASBC/Balling' } as const;

/**
 * Alcohol by volume (% v/v), F4.6 density form: ABV = A × ρ_beer/ρ_ethanol with
 * ρ_beer = FG × ρ_water, i.e. ABV = A × FG × 998.20/789.24 = A × FG / 0.79066 (20/20 °C).
 * A by F4.4. Not the 131 × (OG − FG) shortcut, which under-reads at high gravity.
 */
export function abv(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  const a = abwFromExtracts(oe, balling(oe, ae));
  return (a * fg * WATER_DENSITY_20C) / ETHANOL_DENSITY_20C;
}

/**
 * Real degree of fermentation in %, F4.5 (the corrected form used for ASBC Beer-6):
 * RDF = 100·(OE − RE)/OE × 1/(1 − 0.005161·RE), identical to 100·2.0665A/(2.0665A + RE).
 * The uncorrected F4.5s (100·(OE − RE)/OE = 0.8192 × ADF) reads 1.3–1.8 points lower; REFERENCE's
 * RDF check values (62.943, 67.332, 66.47) are F4.5.
 */
export function realAttenuation(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  const re = balling(oe, ae);
  return (100 * (oe - re)) / oe / (1 - 0.005161 * re);
}
