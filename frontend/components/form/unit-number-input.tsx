import { useEffect, useRef, useState } from 'react';
import { useController, type Control, type FieldPath, type FieldValues } from 'react-hook-form';
import { parseDecimal } from '@/components/form/decimal';
import { Field, type FieldProps } from '@/components/ui/field';
import { Input, type InputProps } from '@/components/ui/input';
import { useUnits } from '@/hooks/use-units';
import { fromDisplay, toDisplay, unitLabels, type Quantity, type UnitSystem } from '@/lib/units';
import { cn } from '@/utils/cn';

/** A quantity in the person's units (`Quantity`), or a plain number with its own label (gravity, volumes of CO2, days). */
export type NumberKind = Quantity | { label: string };

/** Decimal places shown for a value the API sends, per quantity and unit system. */
const shownDigits: Record<Quantity, Record<UnitSystem, number>> = {
  volume: { metric: 2, us: 2 },
  temperature: { metric: 1, us: 1 },
  pressure: { metric: 2, us: 1 },
  length: { metric: 2, us: 2 },
  smallLength: { metric: 2, us: 4 },
  mass: { metric: 2, us: 2 },
};

const labelOf = (kind: NumberKind, units: UnitSystem) => (typeof kind === 'string' ? unitLabels[units][kind] : kind.label);

/** The API value → the text shown in the box (no trailing zeros, a decimal point). */
export function displayText(value: number | null | undefined, kind: NumberKind, units: UnitSystem, digits?: number): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return '';
  const shown = typeof kind === 'string' ? toDisplay[kind](value, units) : value;
  if (!Number.isFinite(shown)) return '';
  const places = digits ?? (typeof kind === 'string' ? shownDigits[kind][units] : 6);
  return String(Number(shown.toFixed(places)));
}

/**
 * Typed text → the API value: `null` for an empty box, NaN for text that is not a number yet or a
 * value the shared conversions refuse (a negative volume, below absolute zero); otherwise the number
 * converted from the person's units through `shared/brewing`, rounded to `apiDigits` when given.
 */
export function apiValueOf(text: string, kind: NumberKind, units: UnitSystem, apiDigits?: number): number | null {
  const typed = parseDecimal(text);
  if (typed === null || Number.isNaN(typed)) return typed;
  const api = typeof kind === 'string' ? fromDisplay[kind](typed, units) : typed;
  if (!Number.isFinite(api) || apiDigits === undefined) return api;
  const scale = 10 ** apiDigits;
  return Math.round(api * scale) / scale;
}

const sameValue = (a: number | null | undefined, b: number | null | undefined) =>
  a === b || (typeof a === 'number' && typeof b === 'number' && Number.isNaN(a) && Number.isNaN(b));

export interface UnitNumberInputProps extends Omit<InputProps, 'value' | 'defaultValue' | 'onChange' | 'type'> {
  /** What the number measures; its unit follows the person's preference. */
  kind: NumberKind;
  /** The value in the API's unit (L, °C, kPa gauge, m, mm, kg). */
  value: number | null | undefined;
  /** Called with the API value as the person types (see {@link apiValueOf}). */
  onValueChange: (value: number | null) => void;
  /** Decimal places shown for a value that comes from outside (defaults per quantity). */
  digits?: number;
  /** Decimal places the API value is rounded to. */
  apiDigits?: number;
  /** Overrides the person's preference (tests, or a screen that shows one system). */
  units?: UnitSystem;
}

/**
 * A number box in the person's units (metric or US, from their profile) that accepts a decimal comma or
 * point and hands the API value on. What was typed stays as typed, half-typed or not; the value is
 * converted whenever the text parses. A value set from outside (a reset, a change of units) is shown anew.
 */
export const UnitNumberInput = ({ kind, value, onValueChange, digits, apiDigits, units: fixedUnits, className, ...input }: UnitNumberInputProps) => {
  const preferred = useUnits().units;
  const units = fixedUnits ?? preferred;
  const [text, setText] = useState(() => displayText(value, kind, units, digits));
  const reported = useRef<{ value: number | null | undefined; units: UnitSystem }>({ value, units });
  useEffect(() => {
    if (sameValue(reported.current.value, value) && reported.current.units === units) return;
    reported.current = { value, units };
    setText(displayText(value, kind, units, digits));
  }, [value, units, kind, digits]);
  const unit = labelOf(kind, units);
  return (
    <div className="relative">
      <Input
        {...input}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        value={text}
        className={cn(unit ? 'pr-12' : undefined, className)}
        onChange={(event) => {
          const next = apiValueOf(event.target.value, kind, units, apiDigits);
          setText(event.target.value);
          reported.current = { value: next, units };
          onValueChange(next);
        }}
      />
      {unit ? (
        <span className="pointer-events-none absolute inset-y-0 right-0 flex items-center pr-3 text-sm text-ink-muted" data-unit="">
          {unit}
        </span>
      ) : null}
    </div>
  );
};

export interface UnitNumberFieldProps<T extends FieldValues>
  extends Omit<FieldProps, 'children' | 'error'>, Omit<UnitNumberInputProps, 'value' | 'onValueChange' | 'className'> {
  control: Control<T>;
  name: FieldPath<T>;
  /** Classes for the box itself (`className` goes to the field). */
  inputClassName?: string;
}

/**
 * A labelled {@link UnitNumberInput} bound to a react-hook-form field: the form holds the API value,
 * the field shows the schema's or the server's message for it.
 */
export const UnitNumberField = <T extends FieldValues>({ control, name, label, hint, aside, className, inputClassName, ...input }: UnitNumberFieldProps<T>) => {
  const { field, fieldState } = useController({ control, name });
  return (
    <Field label={label} hint={hint} aside={aside} className={className} error={fieldState.error?.message}>
      {({ invalid, ...ids }) => (
        <UnitNumberInput
          {...input}
          {...ids}
          invalid={invalid}
          name={field.name}
          ref={field.ref}
          onBlur={field.onBlur}
          className={inputClassName}
          value={field.value}
          onValueChange={field.onChange}
        />
      )}
    </Field>
  );
};
