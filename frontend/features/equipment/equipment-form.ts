import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldError, FieldErrors, Path, Resolver, UseFormSetError } from 'react-hook-form';
import type { z } from 'zod';
import type { Equipment, EquipmentKind } from '../../../shared/schemas/equipment.ts';
import { ApiProblem, isApiProblem } from '@/lib/api-client';
import { toDisplay, unitLabels, type Quantity, type UnitSystem } from '@/lib/units';
import { applyProblemToForm } from '@/utils/problem-form';

/**
 * The add and edit forms hold the API's values under the API's field names (`capacityLiters`,
 * `attributes.lineLengthM` …): litres, metres, millimetres, kilograms, °C, kPa gauge. Each number box shows
 * and takes its quantity in the person's units through the form kit's `UnitNumberField`, which converts only
 * through `shared/brewing`; the resolver keeps the kind's own attributes and validates with the shared schema,
 * so its errors land on the same field names.
 */
export interface AttributeFormValues {
  style?: 'bucket' | 'conical';
  hasValve?: boolean;
  serial?: string;
  lock?: 'ball' | 'pin';
  /** Rated working pressure: bar or psi on screen, kPa gauge in the form and the API. */
  ratedPressureKpa?: number | null;
  position?: string;
  lineLengthM?: number | null;
  lineInsideDiameterMm?: number | null;
  /** '' when not recorded (taken as vinyl). */
  lineMaterial?: '' | 'vinyl' | 'polyethylene' | 'barrier' | 'stainless';
  /** kPa per metre whatever the person's units (as the co-op's faucet allowance is in kPa). */
  lineResistanceKpaPerM?: number | null;
  riseM?: number | null;
  coldRoomTempC?: number | null;
  sizeKg?: number | null;
  fillPercent?: number | null;
  hydroTestDue?: string;
}

export interface EquipmentFormValues {
  kind: EquipmentKind;
  code: string;
  name: string;
  capacityLiters: number | null;
  notes: string;
  attributes: AttributeFormValues;
}

type AttributeQuantity = Quantity | 'none';

/** Each kind's attributes with the quantity its number is in (strings and choices are `none`). */
export const attributeQuantities: Record<EquipmentKind, Partial<Record<keyof AttributeFormValues, AttributeQuantity>>> = {
  fermenter: { style: 'none', hasValve: 'none' },
  keg: { serial: 'none', lock: 'none', ratedPressureKpa: 'pressure' },
  tap: {
    position: 'none',
    lineLengthM: 'length',
    lineInsideDiameterMm: 'smallLength',
    lineMaterial: 'none',
    lineResistanceKpaPerM: 'none',
    riseM: 'length',
    coldRoomTempC: 'temperature',
  },
  co2_cylinder: { sizeKg: 'mass', fillPercent: 'none', hydroTestDue: 'none' },
};

/** Fermenters and kegs have a volume; taps and cylinders do not. */
export const kindHasCapacity = (kind: EquipmentKind) => kind === 'fermenter' || kind === 'keg';

export const defaultAttributes: Record<EquipmentKind, AttributeFormValues> = {
  fermenter: { style: 'bucket', hasValve: false },
  keg: { serial: '', lock: 'ball', ratedPressureKpa: null },
  tap: { position: '', lineLengthM: null, lineInsideDiameterMm: null, lineMaterial: '', lineResistanceKpaPerM: null, riseM: null, coldRoomTempC: null },
  co2_cylinder: { sizeKg: null, fillPercent: 100, hydroTestDue: '' },
};

const rounded = (value: number) => Number(value.toFixed(4));

/** An empty number box is "not given"; an empty text box stays '' so the schema says what it wants. */
const given = (value: unknown, quantity: AttributeQuantity) => !(value === null || value === undefined || (value === '' && quantity !== 'none'));

/** An item as the edit form starts: every attribute of its kind present, numbers in the API's units. */
export function formValuesOf(item: Equipment): EquipmentFormValues {
  const attributes: AttributeFormValues = { ...defaultAttributes[item.kind] };
  for (const key of Object.keys(attributeQuantities[item.kind])) {
    const value = item.attributes[key];
    if (value !== undefined) (attributes as Record<string, unknown>)[key] = value;
  }
  return { kind: item.kind, code: item.code, name: item.name, capacityLiters: item.capacityLiters, notes: item.notes, attributes };
}

/** The form's values as the API takes them: only the kind's own attributes, empty number boxes left out. */
export function toApiValues(values: EquipmentFormValues) {
  const attributes: Record<string, unknown> = {};
  for (const [key, quantity] of Object.entries(attributeQuantities[values.kind])) {
    const value = (values.attributes as Record<string, unknown>)[key];
    // An unrecorded line material stays unrecorded.
    if (given(value, quantity) && !(key === 'lineMaterial' && value === '')) attributes[key] = value;
  }
  const capacity = kindHasCapacity(values.kind) && given(values.capacityLiters, 'volume') ? values.capacityLiters : undefined;
  return {
    kind: values.kind,
    code: values.code,
    name: values.name,
    ...(capacity !== undefined ? { capacityLiters: capacity } : {}),
    notes: values.notes,
    attributes,
  };
}

/** Every field name the forms show, for placing errors. */
export const equipmentFieldNames = ['kind', 'code', 'name', 'capacityLiters', 'notes', 'attributes'] as const satisfies readonly Path<EquipmentFormValues>[];
const attributeFieldNames = [...new Set(Object.values(attributeQuantities).flatMap((q) => Object.keys(q)))];

/** An empty required number reads "Enter a number" rather than the schema's type message. */
function friendlier(errors: FieldErrors<EquipmentFormValues>, values: EquipmentFormValues): FieldErrors<EquipmentFormValues> {
  // A box left empty (null) or holding text that is not a number yet (NaN).
  const empty = (v: unknown) => v === null || v === undefined || Number.isNaN(v);
  const fix = (error: FieldError | undefined, value: unknown) => {
    if (error && error.type === 'invalid_type' && empty(value)) error.message = 'Enter a number';
  };
  fix(errors.capacityLiters, values.capacityLiters);
  const attributeErrors = errors.attributes as Record<string, FieldError> | undefined;
  if (attributeErrors) for (const key of Object.keys(attributeErrors)) fix(attributeErrors[key], (values.attributes as Record<string, unknown>)[key]);
  return errors;
}

/**
 * react-hook-form resolver over a shared schema: converts the form to API values, lets the schema parse them
 * (`TOutput` is what `handleSubmit` hands on, ready to send).
 */
export function equipmentResolver<TOutput>(schema: z.ZodType<TOutput>): Resolver<EquipmentFormValues, unknown, TOutput> {
  const inner = zodResolver(schema as never) as unknown as Resolver<Record<string, unknown>, unknown, TOutput>;
  return async (values, context, options) => {
    const result = await inner(toApiValues(values), context, options as never);
    if (Object.keys(result.errors).length) return { values: {}, errors: friendlier(result.errors, values) };
    return result;
  };
}

/**
 * Places an API problem next to the form's fields: `attributes.x` on its own field, a taken code on Code,
 * the rest through `applyProblemToForm`. Returns what belongs at the top of the form.
 */
export function applyEquipmentProblem(error: unknown, setError: UseFormSetError<EquipmentFormValues>): string[] {
  if (!isApiProblem(error)) return applyProblemToForm(error, setError, equipmentFieldNames);
  if (error.status === 409 && error.errors.length === 0 && /code/i.test(error.detail ?? '')) {
    setError('code', { type: 'server', message: error.detail ?? 'This code is taken' });
    return [];
  }
  const rest = error.errors.filter((item) => {
    const path = item.path
      .replace(/^#?\//, '')
      .replace(/\//g, '.')
      .replace(/^body\./, '');
    const [head, key] = path.split('.');
    if (head !== 'attributes' || !key || !attributeFieldNames.includes(key)) return true;
    setError(`attributes.${key}` as Path<EquipmentFormValues>, { type: 'server', message: item.message });
    return false;
  });
  if (error.errors.length > 0 && rest.length === 0) return [];
  const remaining = new ApiProblem({
    status: error.status,
    title: error.title,
    type: error.type,
    errors: rest,
    ...(error.detail !== undefined ? { detail: error.detail } : {}),
  });
  return applyProblemToForm(remaining, setError, equipmentFieldNames);
}

const choiceLabels: Record<string, string> = { bucket: 'Bucket', conical: 'Conical', ball: 'Ball lock', pin: 'Pin lock' };

/** One stored attribute as the item page shows it, in the person's units. */
export function formatAttribute(kind: EquipmentKind, key: string, value: unknown, units: UnitSystem): string {
  const quantity = (attributeQuantities[kind] as Record<string, AttributeQuantity | undefined>)[key];
  if (typeof value === 'boolean') return value ? 'Yes' : 'No';
  if (typeof value === 'number' && quantity && quantity !== 'none') {
    return `${new Intl.NumberFormat(undefined, { maximumFractionDigits: quantity === 'smallLength' && units === 'us' ? 4 : 2 }).format(rounded(toDisplay[quantity](value, units)))} ${unitLabels[units][quantity]}`;
  }
  if (key === 'fillPercent' && typeof value === 'number') return `${value} %`;
  if (typeof value === 'string') return choiceLabels[value] ?? value;
  return String(value);
}
