/**
 * A number as people type it: a decimal point or a decimal comma ("4,5" is 4.5), an optional sign,
 * spaces around it ignored. Empty text is `null`; text that is not (yet) a number, such as "-" or
 * "1,2,3", is NaN, so a half-typed value is kept as text and refused by the form's schema.
 */
export function parseDecimal(text: string): number | null {
  const trimmed = text.trim();
  if (trimmed === '') return null;
  if (!/^[+-]?(\d+([.,]\d*)?|[.,]\d+)$/.test(trimmed)) return Number.NaN;
  return Number(trimmed.replace(',', '.'));
}

/** react-hook-form `register` options for a required number box: a decimal comma is read, empty is NaN (the schema refuses it). */
export const asNumber = { setValueAs: (v: string) => parseDecimal(String(v)) ?? Number.NaN };

/** The same for an optional number box: empty is `undefined`. */
export const asOptionalNumber = { setValueAs: (v: string) => parseDecimal(String(v)) ?? undefined };

/** The same for a box that may be left empty: empty is `null` ("not given"). */
export const asNullableNumber = { setValueAs: (v: string | null | undefined) => (v === null || v === undefined ? null : parseDecimal(String(v))) };
