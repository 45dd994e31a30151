import {
  barToKpa,
  celsiusToFahrenheit,
  fahrenheitToCelsius,
  feetToMetres,
  inchesToMillimetres,
  kilogramsToPounds,
  kpaToBar,
  kpaToPsi,
  litersToUsGallons,
  metresToFeet,
  millimetresToInches,
  poundsToKilograms,
  psiToKpa,
  usGallonsToLiters,
} from '../../shared/brewing/index.ts';
import type { UnitSystem } from '../../shared/schemas/user.ts';

/**
 * Display units. The API always speaks litres, °C and kPa gauge; a person's preference
 * (`metric`: L, °C, bar · `us`: gal, °F, psi) only changes what is shown and typed.
 */
export type { UnitSystem };

/**
 * Every conversion goes through `shared/brewing`, which refuses what no quantity can be (a negative
 * volume, a temperature below absolute zero, NaN) by throwing. Volumes, lengths and masses scale
 * linearly, so a sign (a drop, a difference) is carried across; what is refused comes back as NaN,
 * which the forms' schemas turn into a message.
 */
const signed = (convert: (magnitude: number) => number) => (value: number) =>
  Number.isFinite(value) ? Math.sign(value) * convert(Math.abs(value)) : Number.NaN;
const refusedAsNaN = (convert: (value: number) => number) => (value: number) => {
  try {
    return convert(value);
  } catch (error) {
    if (error instanceof RangeError) return Number.NaN;
    throw error;
  }
};

type Convert = (value: number) => number;
const same: Convert = (value) => value;

/** The quantities the client converts between the API's units and the person's. */
export type Quantity = 'volume' | 'temperature' | 'pressure' | 'length' | 'smallLength' | 'mass';

/** Per quantity and unit system: API value → shown, and shown → API value. */
const conversions: Record<Quantity, Record<UnitSystem, readonly [toDisplay: Convert, fromDisplay: Convert]>> = {
  volume: { metric: [same, same], us: [signed(litersToUsGallons), signed(usGallonsToLiters)] },
  temperature: { metric: [same, same], us: [refusedAsNaN(celsiusToFahrenheit), refusedAsNaN(fahrenheitToCelsius)] },
  pressure: { metric: [refusedAsNaN(kpaToBar), refusedAsNaN(barToKpa)], us: [refusedAsNaN(kpaToPsi), refusedAsNaN(psiToKpa)] },
  /** Metres ↔ m or ft (line lengths, rises). */
  length: { metric: [same, same], us: [refusedAsNaN(metresToFeet), refusedAsNaN(feetToMetres)] },
  /** Millimetres ↔ mm or in (a line's inside diameter). */
  smallLength: { metric: [same, same], us: [signed(millimetresToInches), signed(inchesToMillimetres)] },
  /** Kilograms ↔ kg or lb (a CO2 cylinder's size). */
  mass: { metric: [same, same], us: [signed(kilogramsToPounds), signed(poundsToKilograms)] },
};

const direction = (way: 0 | 1) =>
  Object.fromEntries(
    Object.entries(conversions).map(([quantity, bySystem]) => [quantity, (value: number, units: UnitSystem) => bySystem[units][way](value)]),
  ) as Record<Quantity, (value: number, units: UnitSystem) => number>;

/** API value → the number shown in the person's units. */
export const toDisplay = direction(0);

/** A number typed in the person's units → the API value (L, °C, kPa gauge). */
export const fromDisplay = direction(1);

export const unitLabels = {
  metric: { volume: 'L', temperature: '°C', pressure: 'bar', length: 'm', smallLength: 'mm', mass: 'kg' },
  us: { volume: 'gal', temperature: '°F', pressure: 'psi', length: 'ft', smallLength: 'in', mass: 'lb' },
} as const satisfies Record<UnitSystem, Record<Quantity, string>>;

const numberFormats = new Map<string, Intl.NumberFormat>();
function formatNumber(value: number, digits: number): string {
  const key = String(digits);
  let format = numberFormats.get(key);
  if (!format) {
    format = new Intl.NumberFormat(undefined, { minimumFractionDigits: digits, maximumFractionDigits: digits });
    numberFormats.set(key, format);
  }
  return format.format(value);
}

type Amount = number | null | undefined;
const missing = '—';
const isNumber = (value: Amount): value is number => typeof value === 'number' && Number.isFinite(value);

export interface FormatOptions {
  /** Decimal places; each quantity has a sensible default per unit system. */
  digits?: number;
}

export function formatVolume(litres: Amount, units: UnitSystem, options: FormatOptions = {}): string {
  if (!isNumber(litres)) return missing;
  const digits = options.digits ?? (units === 'us' ? 2 : 1);
  return `${formatNumber(toDisplay.volume(litres, units), digits)} ${unitLabels[units].volume}`;
}

export function formatTemperature(celsius: Amount, units: UnitSystem, options: FormatOptions = {}): string {
  if (!isNumber(celsius)) return missing;
  return `${formatNumber(toDisplay.temperature(celsius, units), options.digits ?? 1)} ${unitLabels[units].temperature}`;
}

/** Gauge pressure in bar (metric) or psi (US). */
export function formatPressure(kPa: Amount, units: UnitSystem, options: FormatOptions = {}): string {
  if (!isNumber(kPa)) return missing;
  const digits = options.digits ?? (units === 'us' ? 1 : 2);
  return `${formatNumber(toDisplay.pressure(kPa, units), digits)} ${unitLabels[units].pressure}`;
}

/** Gauge pressure in kPa, for people who set regulators in kPa whatever their preference. */
export function formatKPa(kPa: Amount, options: FormatOptions = {}): string {
  if (!isNumber(kPa)) return missing;
  return `${formatNumber(kPa, options.digits ?? 0)} kPa`;
}

/** The format helpers bound to one person's preference. */
export function unitFormatter(units: UnitSystem) {
  return {
    units,
    labels: unitLabels[units],
    volume: (litres: Amount, options?: FormatOptions) => formatVolume(litres, units, options),
    temperature: (celsius: Amount, options?: FormatOptions) => formatTemperature(celsius, units, options),
    pressure: (kPa: Amount, options?: FormatOptions) => formatPressure(kPa, units, options),
  };
}
export type UnitFormatter = ReturnType<typeof unitFormatter>;
