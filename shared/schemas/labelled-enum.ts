/** A closed set's labels, declared once as `labelsOf({ value: 'Label', … })`; the values come from `valuesOf`. */
export function labelsOf<K extends string>(labels: Record<K, string>): Readonly<Record<K, string>> {
  return labels;
}

/** The values of a closed set, in its labels' order, typed as a non-empty tuple so `z.enum()` accepts them. */
export function valuesOf<K extends string>(labels: Readonly<Record<K, string>>): Readonly<[K, ...K[]]> {
  return Object.keys(labels) as [K, ...K[]];
}
