import type { UnitSystem } from '../../shared/schemas/user.ts';

/**
 * Display units. The API always speaks litres, °C and kPa gauge; a person's preference
 * (`metric`: L, °C, bar · `us`: gal, °F, psi) only changes what is shown and typed.
 */
export type { UnitSystem };

export const litresPerUsGallon = 3.785411784; // 231 in³, exact
export const kPaPerPsi = 6.894757293168361; // lbf/in², exact from the pound-force and the inch
export const kPaPerBar = 100;

export const metresPerFoot = 0.3048; // international foot, exact
export const millimetresPerInch = 25.4; // international inch, exact
export const kilogramsPerPound = 0.45359237; // international avoirdupois pound, exact

export const litresToGallons = (litres: number) => litres / litresPerUsGallon;
export const gallonsToLitres = (gallons: number) => gallons * litresPerUsGallon;
export const celsiusToFahrenheit = (celsius: number) => celsius * 1.8 + 32;
export const fahrenheitToCelsius = (fahrenheit: number) => (fahrenheit - 32) / 1.8;
export const kPaToPsi = (kPa: number) => kPa / kPaPerPsi;
export const psiToKPa = (psi: number) => psi * kPaPerPsi;
export const kPaToBar = (kPa: number) => kPa / kPaPerBar;
export const barToKPa = (bar: number) => bar * kPaPerBar;

export const unitLabels = {
  metric: { volume: 'L', temperature: '°C', pressure: 'bar', length: 'm', smallLength: 'mm', mass: 'kg' },
  us: { volume: 'gal', temperature: '°F', pressure: 'psi', length: 'ft', smallLength: 'in', mass: 'lb' },
} as const satisfies Record<UnitSystem, { volume: string; temperature: string; pressure: string; length: string; smallLength: string; mass: string }>;

/** API value → the number shown in the person's units. */
export const toDisplay = {
  volume: (litres: number, units: UnitSystem) => (units === 'us' ? litresToGallons(litres) : litres),
  temperature: (celsius: number, units: UnitSystem) => (units === 'us' ? celsiusToFahrenheit(celsius) : celsius),
  pressure: (kPa: number, units: UnitSystem) => (units === 'us' ? kPaToPsi(kPa) : kPaToBar(kPa)),
  /** Metres → m or ft (line lengths, rises). */
  length: (metres: number, units: UnitSystem) => (units === 'us' ? metres / metresPerFoot : metres),
  /** Millimetres → mm or in (a line's inside diameter). */
  smallLength: (mm: number, units: UnitSystem) => (units === 'us' ? mm / millimetresPerInch : mm),
  /** Kilograms → kg or lb (a CO2 cylinder's size). */
  mass: (kg: number, units: UnitSystem) => (units === 'us' ? kg / kilogramsPerPound : kg),
};

/** A number typed in the person's units → the API value (L, °C, kPa gauge). */
export const fromDisplay = {
  volume: (value: number, units: UnitSystem) => (units === 'us' ? gallonsToLitres(value) : value),
  temperature: (value: number, units: UnitSystem) => (units === 'us' ? fahrenheitToCelsius(value) : value),
  pressure: (value: number, units: UnitSystem) => (units === 'us' ? psiToKPa(value) : barToKPa(value)),
  length: (value: number, units: UnitSystem) => (units === 'us' ? value * metresPerFoot : value),
  smallLength: (value: number, units: UnitSystem) => (units === 'us' ? value * millimetresPerInch : value),
  mass: (value: number, units: UnitSystem) => (units === 'us' ? value * kilogramsPerPound : value),
};

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
