/**
 * From what a member typed or imported (a number, its scale, the sample temperature) to the
 * specific gravity every figure uses. Used by the server when it stores a reading and by the
 * reading form to show the correction before it is saved.
 */
import { apparentPlatoToSg, brixToSg, convertGravity, correctHydrometer, refractometerFinalGravity } from './index.ts';

export type GravityUnit = 'sg' | 'plato' | 'brix';

/**
 * How a refractometer (Brix) reading becomes a gravity: `wort` when the sample holds no alcohol yet
 * (Brix ÷ wort correction factor, then F2.4⁻¹); `alcohol_corrected` once fermentation has begun
 * (Terrill's cubic with the batch's original Brix).
 */
export const brixMethods = ['wort', 'alcohol_corrected'] as const;
export type BrixMethod = (typeof brixMethods)[number];
export const brixMethodLabels: Record<BrixMethod, string> = {
  wort: 'Wort (no alcohol yet)',
  alcohol_corrected: 'Fermenting or finished (alcohol-corrected)',
};

/** The method a Brix reading takes when none is chosen: wort while the batch has no OG, alcohol-corrected after. */
export function defaultBrixMethod(originalBrix: number | null | undefined): BrixMethod {
  return originalBrix === null || originalBrix === undefined ? 'wort' : 'alcohol_corrected';
}

export interface NormaliseOptions {
  /** Apply the hydrometer temperature correction (SG and °P readings with a temperature). */
  correctTemperature?: boolean;
  /** The hydrometer's calibration temperature, °C (default 20). */
  calibrationC?: number;
  /** Refractometer wort correction factor (default 1.04, common practice). */
  wortCorrectionFactor?: number;
  /**
   * The refractometer reading the batch's original wort would give, °Bx; null or undefined when
   * this reading is itself the first one (before fermentation began).
   */
  originalBrix?: number | null;
  /** How a Brix reading is converted; default from `defaultBrixMethod(originalBrix)`. Ignored for SG and °P. */
  method?: BrixMethod | null;
}

export interface NormalisedGravity {
  /** Specific gravity 20/20 used for every figure, rounded to 4 decimals. */
  sg: number;
  /** The gravity before a correction, or null when none was applied. */
  rawSg: number | null;
  corrected: boolean;
  /** Which correction: hydrometer temperature (F3.1), refractometer wort factor, or Terrill's cubic. */
  correction: 'hydrometer-temperature' | 'refractometer-wort-factor' | 'refractometer-alcohol' | null;
  /** How a Brix reading was converted; null for SG and °P. */
  method: BrixMethod | null;
}

const round4 = (v: number) => Math.round(v * 10_000) / 10_000;

/** Accepted entry ranges per scale, for messages and form hints. */
export const gravityEntryRanges: Record<GravityUnit, { min: number; max: number; label: string }> = {
  sg: { min: 0.98, max: 1.2, label: 'SG' },
  plato: { min: -5, max: 40, label: '°P' },
  brix: { min: 0, max: 40, label: '°Bx' },
};

/**
 * Normalises one reading. SG and °P (F2.1⁻¹) are hydrometer scales: with a temperature and
 * `correctTemperature`, the F3.1 correction to the calibration temperature applies (0–60 °C).
 * Brix is a refractometer scale: the first reading of a batch is wort (F2.4⁻¹ of Brix ÷ WCF);
 * later ones are read through alcohol and use Terrill's cubic with the batch's original Brix.
 * Throws RangeError with a reader-friendly message when the value cannot be a reading.
 */
export function normaliseGravity(
  value: number,
  unit: GravityUnit,
  temperatureC: number | null | undefined,
  { correctTemperature = true, calibrationC = 20, wortCorrectionFactor = 1.04, originalBrix = null, method = null }: NormaliseOptions = {},
): NormalisedGravity {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new RangeError('The gravity is not a number');
  const range = gravityEntryRanges[unit];
  if (!range) throw new RangeError(`Unknown gravity unit ${String(unit)}; use sg, plato or brix`);
  if (value < range.min || value > range.max) {
    throw new RangeError(`A gravity in ${range.label} must be from ${range.min} to ${range.max}; got ${value}`);
  }
  if (unit === 'brix') {
    const chosen = method ?? defaultBrixMethod(originalBrix);
    if (chosen === 'wort') {
      const raw = brixToSg(value);
      const sg = brixToSg(value / wortCorrectionFactor);
      const corrected = wortCorrectionFactor !== 1;
      return { sg: round4(sg), rawSg: corrected ? round4(raw) : null, corrected, correction: corrected ? 'refractometer-wort-factor' : null, method: 'wort' };
    }
    if (originalBrix === null || originalBrix === undefined) {
      throw new RangeError(
        'An alcohol-corrected refractometer reading needs the batch’s original gravity: record the wort reading (OG) first, or read this sample as wort',
      );
    }
    if (value > originalBrix + 1e-9) {
      throw new RangeError(`A refractometer reading after fermentation began cannot be above the original ${originalBrix.toFixed(1)} °Bx; got ${value}`);
    }
    if (value > originalBrix - 1e-9) {
      throw new RangeError(
        `A reading equal to the original ${originalBrix.toFixed(1)} °Bx shows no fermentation yet; the alcohol correction does not apply to wort, so read it as wort`,
      );
    }
    const raw = brixToSg(value / wortCorrectionFactor);
    const sg = refractometerFinalGravity(originalBrix, value, wortCorrectionFactor);
    if (sg < 0.98 || sg > 1.2) throw new RangeError(`The corrected refractometer gravity ${sg.toFixed(4)} is outside 0.980–1.200`);
    return { sg: round4(sg), rawSg: round4(raw), corrected: true, correction: 'refractometer-alcohol', method: 'alcohol_corrected' };
  }
  const raw = unit === 'sg' ? value : apparentPlatoToSg(value);
  if (correctTemperature && temperatureC !== null && temperatureC !== undefined) {
    if (!Number.isFinite(temperatureC) || temperatureC < 0 || temperatureC > 60) {
      throw new RangeError(`The hydrometer correction needs a sample temperature from 0 to 60 °C; got ${temperatureC}`);
    }
    const sg = correctHydrometer(raw, temperatureC, calibrationC);
    if (sg < 0.98 || sg > 1.2) throw new RangeError(`The corrected gravity ${sg.toFixed(4)} is outside 0.980–1.200`);
    return { sg: round4(sg), rawSg: round4(raw), corrected: true, correction: 'hydrometer-temperature', method: null };
  }
  return { sg: round4(raw), rawSg: null, corrected: false, correction: null, method: null };
}

/**
 * What a refractometer would read on the batch's original wort: the first reading itself when it
 * was in Brix, else F2.4 of its gravity times the wort correction factor. Null when the first
 * reading is below SG 1.000 (F2.4's fit starts there) or there is none.
 */
export function originalBrixOf(
  first: { enteredValue: number; enteredUnit: GravityUnit; sg: number } | null | undefined,
  wortCorrectionFactor = 1.04,
): number | null {
  if (!first) return null;
  if (first.enteredUnit === 'brix') return first.enteredValue;
  if (first.sg < 1 || first.sg > 1.17874) return null;
  return convertGravity(first.sg, 'sg', 'brix') * wortCorrectionFactor;
}

/**
 * Apparent attenuation above which a reading is refused unless the user confirms it, %. A beer
 * finishing below 1.000 passes 100 %; very dry beers (diastatic or wild yeast) reach a few percent
 * beyond, so 105 % is taken as the end of the plausible range and anything further is far more
 * often a misread scale or a wrong OG (common practice).
 */
export const MAX_PLAUSIBLE_ATTENUATION = 105;

export interface GravityCheck {
  /** Apparent attenuation against the batch's OG, % (F4.1, SG form). */
  apparentAttenuation: number;
  /** Why the reading cannot be stored, or null. */
  refusal: string | null;
  /** True when the refusal is lifted by the user's confirmation. */
  confirmable: boolean;
}

/**
 * Checks a later reading against the batch's original gravity. A gravity above the OG is not
 * physically possible once the wort is in the fermenter (refused outright); an apparent
 * attenuation above `MAX_PLAUSIBLE_ATTENUATION` is refused unless `confirm`.
 */
export function checkAgainstOriginal(sg: number, og: number, confirm = false): GravityCheck {
  const apparentAttenuation = og > 1 ? (100 * (og - sg)) / (og - 1) : 0;
  if (sg > og + 1e-9) {
    return {
      apparentAttenuation,
      refusal: `The gravity ${sg.toFixed(4)} is above the batch’s original gravity ${og.toFixed(4)}; a reading after the OG cannot be higher. Check the scale and the method`,
      confirmable: false,
    };
  }
  if (apparentAttenuation > MAX_PLAUSIBLE_ATTENUATION && !confirm) {
    return {
      apparentAttenuation,
      refusal: `The gravity ${sg.toFixed(4)} means an apparent attenuation of ${apparentAttenuation.toFixed(0)} % from the OG ${og.toFixed(4)}, beyond the plausible ${MAX_PLAUSIBLE_ATTENUATION} %; check the reading, or confirm it`,
      confirmable: true,
    };
  }
  return { apparentAttenuation, refusal: null, confirmable: false };
}
