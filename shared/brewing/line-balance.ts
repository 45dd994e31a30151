/**
 * Draught line balance: published tubing resistances, balanced line length and line volume (REFERENCE §6).
 */
import { KPA_PER_PSI, METRES_PER_FOOT } from './constants.ts';
import { requireFinite, requireNonNegative, requireRange } from './validation.ts';

/** Tubing kinds with a nominal resistance in {@link lineResistanceKpaPerM}; sizes are inside diameters unless `-od`. */
export type LineTubing =
  | 'vinyl-3/16'
  | 'vinyl-1/4'
  | 'vinyl-5/16'
  | 'vinyl-3/8'
  | 'vinyl-1/2'
  | 'polyethylene-3/16'
  | 'barrier-3/16'
  | 'polyethylene-1/4'
  | 'barrier-5/16'
  | 'stainless-1/4-od'
  | 'stainless-5/16-od'
  | 'stainless-3/8-od';

const psiPerFtToKpaPerM = (psiPerFt: number): number => (psiPerFt * KPA_PER_PSI) / METRES_PER_FOOT;

/** What a beer line is made of; stainless sizes are outside diameters, the rest inside diameters. */
export const lineMaterials = ['vinyl', 'polyethylene', 'barrier', 'stainless'] as const;
export type LineMaterial = (typeof lineMaterials)[number];

/** One published resistance figure for a tubing kind (psi per foot, nominal, cold carbonated beer). */
export interface PublishedLineResistance {
  psiPerFt: number;
  /** Upper end when the source gives a range. */
  psiPerFtMax?: number;
  /** Source ids of REFERENCE §6 (and §8 for common practice). */
  source: string;
}

/** A row of the line resistance table: the figures sources publish and the default the product uses. */
export interface LineTubingFigures {
  tubing: LineTubing;
  material: LineMaterial;
  /** Nominal diameter in inches (inside, or outside for stainless) and in mm. */
  diameterIn: string;
  diameterMm: number;
  published: readonly PublishedLineResistance[];
  /** The default resistance, psi/ft. */
  defaultPsiPerFt: number;
  /** Why the default: a source id, or "common practice" with the rule it reproduces. */
  defaultBasis: string;
}

/**
 * A stainless row (outside diameter): S31's figure is the default, at low confidence; S33 lists a
 * second figure for some sizes.
 */
function stainless(diameterIn: '1/4' | '5/16' | '3/8', diameterMm: number, s31PsiPerFt: number, s33PsiPerFt?: number): LineTubingFigures {
  const s33 = s33PsiPerFt === undefined ? [] : [{ psiPerFt: s33PsiPerFt, source: 'S33' }];
  return {
    tubing: `stainless-${diameterIn}-od`,
    material: 'stainless',
    diameterIn,
    diameterMm,
    published: [{ psiPerFt: s31PsiPerFt, source: 'S31' }, ...s33],
    defaultPsiPerFt: s31PsiPerFt,
    defaultBasis: 'S31 (low confidence)',
  };
}

/**
 * The line resistance table of REFERENCE §6, by tubing inside diameter and material, with the
 * source of every figure. Values vary by maker, temperature and flow, so every default can be
 * overridden per tap and per plan.
 *
 * 3/16" vinyl: sources disagree. The figure quoted from the draught quality manual is 3.0 psi/ft
 * (S28, S30, S31); measured homebrew values run 1.8–2.7 (S32) and 2.2 (S33). At 3.0 a 12 psi
 * line would be about 3.7 ft long, while common practice serves 10–12 psi through 5–10 ft, most
 * often about 8 ft (REFERENCE §8). The default is the common-practice figure: 1.375 psi/ft, so
 * 12 psi less the usual 1 psi faucet and coupler allowance balances 8 ft with no rise.
 */
export const lineTubingTable: readonly LineTubingFigures[] = Object.freeze([
  {
    tubing: 'vinyl-3/16',
    material: 'vinyl',
    diameterIn: '3/16',
    diameterMm: 4.76,
    published: [
      { psiPerFt: 3.0, source: 'S28, S30, S31' },
      { psiPerFt: 1.8, psiPerFtMax: 2.7, source: 'S32' },
      { psiPerFt: 2.2, source: 'S33' },
    ],
    defaultPsiPerFt: 1.375,
    defaultBasis: 'common practice: about 8 ft at 12 psi with a 1 psi allowance',
  },
  {
    tubing: 'vinyl-1/4',
    material: 'vinyl',
    diameterIn: '1/4',
    diameterMm: 6.35,
    published: [{ psiPerFt: 0.85, source: 'S34' }],
    defaultPsiPerFt: 0.85,
    defaultBasis: 'S34',
  },
  {
    tubing: 'vinyl-5/16',
    material: 'vinyl',
    diameterIn: '5/16',
    diameterMm: 7.94,
    published: [{ psiPerFt: 0.4, source: 'S33' }],
    defaultPsiPerFt: 0.4,
    defaultBasis: 'S33',
  },
  {
    tubing: 'vinyl-3/8',
    material: 'vinyl',
    diameterIn: '3/8',
    diameterMm: 9.53,
    published: [{ psiPerFt: 0.2, source: 'S33' }],
    defaultPsiPerFt: 0.2,
    defaultBasis: 'S33',
  },
  {
    tubing: 'vinyl-1/2',
    material: 'vinyl',
    diameterIn: '1/2',
    diameterMm: 12.7,
    published: [{ psiPerFt: 0.025, source: 'S32' }],
    defaultPsiPerFt: 0.025,
    defaultBasis: 'S32',
  },
  {
    tubing: 'polyethylene-3/16',
    material: 'polyethylene',
    diameterIn: '3/16',
    diameterMm: 4.76,
    published: [{ psiPerFt: 2.2, source: 'S30, S33' }],
    defaultPsiPerFt: 2.2,
    defaultBasis: 'S30, S33',
  },
  {
    tubing: 'polyethylene-1/4',
    material: 'polyethylene',
    diameterIn: '1/4',
    diameterMm: 6.35,
    published: [{ psiPerFt: 0.5, source: 'S33' }],
    defaultPsiPerFt: 0.5,
    defaultBasis: 'S33',
  },
  {
    tubing: 'barrier-3/16',
    material: 'barrier',
    diameterIn: '3/16',
    diameterMm: 4.76,
    published: [{ psiPerFt: 2.2, source: 'S30, S33' }],
    defaultPsiPerFt: 2.2,
    defaultBasis: 'S30, S33',
  },
  {
    tubing: 'barrier-5/16',
    material: 'barrier',
    diameterIn: '5/16',
    diameterMm: 7.94,
    published: [{ psiPerFt: 0.1, source: 'S34' }],
    defaultPsiPerFt: 0.1,
    defaultBasis: 'S34',
  },
  // Stainless: one source (S31); another lists 5/16" ID 0.3 and 3/8" 0.12 (S33), so low confidence.
  stainless('1/4', 6.35, 2.0),
  stainless('5/16', 7.94, 0.5, 0.3),
  stainless('3/8', 9.53, 0.2, 0.12),
] satisfies LineTubingFigures[]);

/** Default resistance of each tubing kind, kPa per metre (the `defaultPsiPerFt` of {@link lineTubingTable}). */
export const lineResistanceKpaPerM: Readonly<Record<LineTubing, number>> = Object.freeze(
  Object.fromEntries(lineTubingTable.map((t) => [t.tubing, psiPerFtToKpaPerM(t.defaultPsiPerFt)])) as Record<LineTubing, number>,
);

/** A published figure converted to kPa per metre (the lower end of a range). */
export function publishedLineResistanceKpaPerM(tubing: LineTubing, source: string): number {
  const hit = lineTubingTable.find((t) => t.tubing === tubing)?.published.find((p) => p.source.split(', ').includes(source));
  if (!hit) throw new RangeError(`No figure from ${source} for ${tubing}`);
  return psiPerFtToKpaPerM(hit.psiPerFt);
}

/** The tubing kind of a material and nominal diameter (mm, within 0.4 mm), or null when the table has none. */
export function lineTubingFor(material: LineMaterial, diameterMm: number): LineTubing | null {
  return lineTubingTable.find((t) => t.material === material && Math.abs(t.diameterMm - diameterMm) <= 0.4)?.tubing ?? null;
}

/** Static lift of beer, 0.5 psi per foot of rise (DBQM rounding, F6.1), in kPa per metre. */
const LIFT_KPA_PER_M = psiPerFtToKpaPerM(0.5);

/** Inputs of {@link balancedLineLength}. */
export interface LineBalanceInput {
  /** Applied (regulator) gauge pressure, kPa, 0–700. */
  pressureKpa: number;
  /** Resistance of the beer line, kPa/m, above 0 and at most 200 (see {@link lineResistanceKpaPerM}). */
  resistanceKpaPerM: number;
  /** Rise from keg to faucet in metres, −50 to 50 (negative for a drop); default 0. */
  riseM?: number;
  /** Faucet, shank and coupler allowance, kPa, ≥ 0; default 0. */
  fixedKpa?: number;
}

/**
 * Beer-line length in metres that balances the applied pressure, F6.1:
 * L = (P_applied − lift·H_rise − P_fixed)/R, lift = 0.5 psi/ft (11.31 kPa/m).
 * Throws a RangeError when the pressure cannot even cover the rise and fixed allowance.
 */
export function balancedLineLength({ pressureKpa, resistanceKpaPerM, riseM = 0, fixedKpa = 0 }: LineBalanceInput): number {
  requireRange('pressureKpa', pressureKpa, 0, 700, 'kPa gauge');
  requireFinite('resistanceKpaPerM', resistanceKpaPerM);
  if (resistanceKpaPerM <= 0 || resistanceKpaPerM > 200) {
    throw new RangeError(`resistanceKpaPerM must be above 0 and at most 200 kPa/m; got ${resistanceKpaPerM}`);
  }
  requireRange('riseM', riseM, -50, 50, 'm');
  requireRange('fixedKpa', fixedKpa, 0, 700, 'kPa');
  const available = pressureKpa - LIFT_KPA_PER_M * riseM - fixedKpa;
  if (available <= 0) {
    throw new RangeError(
      `pressureKpa (${pressureKpa}) must exceed the lift (${(LIFT_KPA_PER_M * riseM).toFixed(2)} kPa) plus fixedKpa (${fixedKpa}) for a positive line length`,
    );
  }
  return available / resistanceKpaPerM;
}

/**
 * Volume of beer held by a line, F6.2: V = π/4·d²·L. With d in mm and L in m the result is in mL.
 * Length ≥ 0 m; inside diameter above 0 and at most 100 mm.
 */
export function lineVolumeMl(lengthM: number, insideDiameterMm: number): number {
  requireNonNegative('lengthM', lengthM, 'm');
  requireFinite('insideDiameterMm', insideDiameterMm);
  if (insideDiameterMm <= 0 || insideDiameterMm > 100) {
    throw new RangeError(`insideDiameterMm must be above 0 and at most 100 mm; got ${insideDiameterMm}`);
  }
  return (Math.PI / 4) * insideDiameterMm * insideDiameterMm * lengthM;
}
