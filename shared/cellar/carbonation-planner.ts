import {
  balancedLineLength,
  carbonationPressureKpa,
  co2Volumes,
  lineResistanceKpaPerM,
  lineTubingFor,
  type LineMaterial,
  type LineTubing,
} from '../brewing/index.ts';

/**
 * The carbonation planner: target CO2 volumes, cold-room temperature, altitude and method give
 * the regulator pressure, the expected ready date and, for a fast start, when to lower the
 * pressure. All the physics comes from `shared/brewing` (REFERENCE §5 and §6); the times are the
 * trade's common practice (about two weeks set-and-hold; about three days at high pressure, then
 * serving pressure), which the co-op can change in Settings. Used by the planner screen as the
 * brewer types and by the server when it saves a plan, so both always agree.
 */

export const carbonationMethods = ['set_and_hold', 'fast_start'] as const;
export type CarbonationMethod = (typeof carbonationMethods)[number];

export const carbonationMethodLabels: Record<CarbonationMethod, string> = {
  set_and_hold: 'Set and hold at serving pressure',
  fast_start: 'Fast start at high pressure, then serving pressure',
};

export interface PlanInput {
  targetVolumes: number;
  temperatureC: number;
  altitudeM: number;
  method: CarbonationMethod;
  startedAt: Date | string;
  /** Set and hold: days at serving pressure. */
  holdDays: number;
  /** Fast start only. */
  fastStartPressureKpa?: number | undefined;
  fastStartHours?: number | undefined;
  settleDays?: number | undefined;
  /** The co-op's ceiling for any regulator setting in a plan. */
  maxPressureKpa: number;
}

export interface PlanResult {
  servingPressureKpa: number;
  /** True when the beer already holds the target at atmospheric pressure (serving pressure ≤ 0). */
  noPressureNeeded: boolean;
  startedAt: string;
  /** Fast start: when to turn the regulator down to serving pressure. */
  lowerPressureAt: string | null;
  readyAt: string;
  /** Fast start: CO2 volumes the beer would reach if the high pressure were never lowered. */
  fastStartEquilibriumVolumes: number | null;
  /** Warnings about this plan (pressures, over-carbonation). */
  warnings: string[];
}

export class PlanError extends RangeError {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
  }
}

const hour = 3_600_000;
const day = 24 * hour;

/** The gauge offset altitude adds to every setting (F5.5 through carbonationPressureKpa). */
function altitudeOffsetKpa(tempC: number, altitudeM: number): number {
  return carbonationPressureKpa(2.5, tempC, altitudeM) - carbonationPressureKpa(2.5, tempC, 0);
}

export function planCarbonation(input: PlanInput): PlanResult {
  const { targetVolumes, temperatureC, altitudeM, method, maxPressureKpa } = input;
  const start = new Date(input.startedAt);
  if (Number.isNaN(start.getTime())) throw new PlanError('startedAt', 'Give the start as a date and time');
  let serving: number;
  try {
    serving = carbonationPressureKpa(targetVolumes, temperatureC, altitudeM);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    const field = /^volumes/.test(msg) ? 'targetVolumes' : /^tempC/.test(msg) ? 'temperatureC' : 'altitudeM';
    throw new PlanError(field, msg);
  }
  const warnings: string[] = [];
  const noPressureNeeded = serving <= 0;
  if (noPressureNeeded) {
    warnings.push('At this temperature the beer already holds that much CO2 without pressure; keep a low serving pressure only to push the beer.');
  }
  if (serving > maxPressureKpa) {
    throw new PlanError(
      'targetVolumes',
      `Serving pressure would be ${serving.toFixed(0)} kPa, above the co-op's limit of ${maxPressureKpa.toFixed(0)} kPa: lower the target or the temperature.`,
    );
  }
  if (serving > 140) warnings.push('That is a high serving pressure: check the line balance, or pour will be fast and foamy.');

  let lowerPressureAt: string | null = null;
  let readyAt: Date;
  let fastStartEquilibriumVolumes: number | null = null;
  if (method === 'fast_start') {
    const p = input.fastStartPressureKpa;
    const hours = input.fastStartHours;
    if (p === undefined || !Number.isFinite(p)) throw new PlanError('fastStartPressureKpa', 'Give the fast-start pressure');
    if (hours === undefined || !Number.isFinite(hours) || hours <= 0 || hours > 120) {
      throw new PlanError('fastStartHours', 'Give the fast-start time, 1 to 120 hours');
    }
    if (p > maxPressureKpa) {
      throw new PlanError('fastStartPressureKpa', `The fast start may not exceed the co-op's limit of ${maxPressureKpa.toFixed(0)} kPa.`);
    }
    if (p <= Math.max(serving, 0)) {
      throw new PlanError('fastStartPressureKpa', 'A fast start needs a pressure above the serving pressure.');
    }
    const seaLevelEquivalent = Math.min(400, Math.max(0, p - altitudeOffsetKpa(temperatureC, altitudeM)));
    fastStartEquilibriumVolumes = co2Volumes(seaLevelEquivalent, temperatureC);
    const lower = new Date(start.getTime() + hours * hour);
    lowerPressureAt = lower.toISOString();
    readyAt = new Date(lower.getTime() + (input.settleDays ?? 2) * day);
    warnings.push(
      `Left at this pressure the beer would reach about ${fastStartEquilibriumVolumes.toFixed(1)} volumes: lower the regulator to serving pressure on time (a reminder is sent to the brewer on duty).`,
    );
    warnings.push('Do not shake or roll the keg at high pressure: that easily over-carbonates.');
  } else {
    if (!Number.isFinite(input.holdDays) || input.holdDays <= 0) throw new PlanError('holdDays', 'Give the days at serving pressure');
    readyAt = new Date(start.getTime() + input.holdDays * day);
  }
  return {
    servingPressureKpa: serving,
    noPressureNeeded,
    startedAt: start.toISOString(),
    lowerPressureAt,
    readyAt: readyAt.toISOString(),
    fastStartEquilibriumVolumes,
    warnings,
  };
}

/** Labels of the line types offered on screens (REFERENCE §6 table). */
export const tubingLabels: Record<LineTubing, string> = {
  'vinyl-3/16': '3/16" (4.8 mm) inside, vinyl',
  'vinyl-1/4': '1/4" (6.4 mm) inside, vinyl',
  'vinyl-5/16': '5/16" (7.9 mm) inside, vinyl',
  'vinyl-3/8': '3/8" (9.5 mm) inside, vinyl',
  'vinyl-1/2': '1/2" (12.7 mm) inside, vinyl',
  'polyethylene-3/16': '3/16" (4.8 mm) inside, polyethylene',
  'polyethylene-1/4': '1/4" (6.4 mm) inside, polyethylene',
  'barrier-3/16': '3/16" (4.8 mm) inside, barrier tubing',
  'barrier-5/16': '5/16" (7.9 mm) inside, barrier tubing',
  'stainless-1/4-od': '1/4" (6.4 mm) outside, stainless',
  'stainless-5/16-od': '5/16" (7.9 mm) outside, stainless',
  'stainless-3/8-od': '3/8" (9.5 mm) outside, stainless',
};

export const lineMaterialLabels: Record<LineMaterial, string> = {
  vinyl: 'Vinyl',
  polyethylene: 'Polyethylene',
  barrier: 'Barrier tubing',
  stainless: 'Stainless (outside diameter)',
};

/** The tubing kind of a line: its material (vinyl unless said) and diameter in mm. */
export function tubingForInsideDiameter(mm: number, material: LineMaterial = 'vinyl'): LineTubing | null {
  return lineTubingFor(material, mm);
}

export interface LineCheckInput {
  servingPressureKpa: number;
  lengthM: number;
  insideDiameterMm: number;
  riseM: number;
  fixedKpa: number;
  /** What the line is made of; vinyl unless said. */
  material?: LineMaterial | null | undefined;
  /** Override: measured or maker's resistance. */
  resistanceKpaPerM?: number | undefined;
}

export interface LineCheck {
  resistanceKpaPerM: number | null;
  tubing: LineTubing | null;
  balancedLengthM: number | null;
  suits: boolean | null;
  verdict: string;
}

/** Whether a tap's line suits the serving pressure (F6.1), and which length would. Within ±15 % or 0.3 m counts as suiting. */
export function checkLine(input: LineCheckInput): LineCheck {
  const tubing = tubingForInsideDiameter(input.insideDiameterMm, input.material ?? 'vinyl');
  const resistance = input.resistanceKpaPerM ?? (tubing ? lineResistanceKpaPerM[tubing] : null);
  if (resistance === null || resistance === undefined) {
    return {
      resistanceKpaPerM: null,
      tubing,
      balancedLengthM: null,
      suits: null,
      verdict: `No resistance is known for ${input.insideDiameterMm} mm ${input.material ?? 'vinyl'} tubing: enter the maker's figure in kPa per metre.`,
    };
  }
  let balanced: number;
  try {
    balanced = balancedLineLength({
      pressureKpa: Math.max(0, input.servingPressureKpa),
      resistanceKpaPerM: resistance,
      riseM: input.riseM,
      fixedKpa: input.fixedKpa,
    });
  } catch {
    return {
      resistanceKpaPerM: resistance,
      tubing,
      balancedLengthM: null,
      suits: false,
      verdict: 'The serving pressure does not even lift the beer to the faucet: lower the rise or raise the serving pressure.',
    };
  }
  const diff = input.lengthM - balanced;
  const suits = Math.abs(diff) <= Math.max(0.3, balanced * 0.15);
  const verdict = suits
    ? `The ${input.lengthM.toFixed(1)} m line suits this pressure (balanced length ${balanced.toFixed(1)} m).`
    : diff < 0
      ? `The line is too short for this pressure: expect fast, foamy pours. About ${balanced.toFixed(1)} m would balance it.`
      : `The line is too long for this pressure: expect slow pours. About ${balanced.toFixed(1)} m would balance it.`;
  return { resistanceKpaPerM: resistance, tubing, balancedLengthM: balanced, suits, verdict };
}
