import { z } from 'zod';

/** A closed set's labels, declared once as `labelsOf({ value: 'Label', … })`; the values come from `valuesOf`. */
export function labelsOf<K extends string>(labels: Record<K, string>): Readonly<Record<K, string>> {
  return labels;
}

/** The values of a closed set, in its labels' order, typed as a non-empty tuple so `z.enum()` accepts them. */
export function valuesOf<K extends string>(labels: Readonly<Record<K, string>>): Readonly<[K, ...K[]]> {
  return Object.keys(labels) as [K, ...K[]];
}

/** A closed set's values (as `valuesOf`) and the zod enum of them, from its labels: `[values, schema]`. */
export function closedSet<K extends string>(labels: Readonly<Record<K, string>>) {
  const values = valuesOf(labels);
  return [values, z.enum(values)] as const;
}
