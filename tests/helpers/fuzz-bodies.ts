/**
 * Generated request bodies for the write fuzzer (tests/api/write-fuzz.test.ts): arbitrary JSON values
 * and objects, and a valid body with one field replaced by a wrong type, a huge or odd string, a
 * negative or huge number, deep nesting, or an array. Strings include NUL and other control characters.
 */
import fc from 'fast-check';

/** A NUL character as JSON text writes it (an escaped backslash before `u0000` is not one). */
export const nulInJson = () => /(?<!\\)((?:\\\\)*)\\u0000/g;
/** What JSON carries of a value (undefined dropped, -0 as 0, …). */
const asJson = (v: unknown): unknown => JSON.parse(JSON.stringify(v) ?? 'null');

const deep = (depth: number, leaf: unknown = 1, asArray = false): unknown => {
  let v = leaf;
  for (let i = 0; i < depth; i++) v = asArray ? [v] : { a: v };
  return v;
};

const anyJson = fc.jsonValue({ maxDepth: 4, stringUnit: 'binary' });
const oddString = fc.oneof(
  fc.string({ unit: 'binary', maxLength: 40 }),
  fc.constantFrom(
    '',
    ' ',
    '\t\n',
    '💥🍺',
    'ı̇ß',
    '\u202e',
    '\ud800',
    '-1',
    '1e400',
    'NaN',
    'null',
    'true',
    '[]',
    '{}',
    '2026-13-45T99:99:99Z',
    '9999-12-31',
    '0000-00-00',
    "'; drop table batch; --",
    '../../etc/passwd',
    '%00',
    '\\u0000',
  ),
  fc.constant('x'.repeat(20_000)),
  fc.constant('ä'.repeat(60_000)), // over the body limit once encoded
  fc.constant('\u0000'),
  fc.constant('a\u0000b'),
);
const oddNumber = fc.oneof(
  fc.integer(),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  // Below what a column keeps (rounding to 0), past what it holds, past what an integer holds.
  fc.constantFrom(-1, 0, -0.0001, 0.1, 0.004, 0.0004, 1e-9, 1e-320, 99_999_999.99, 1e7, 1e308, -1e308, 2 ** 53 + 1, -(2 ** 31) - 1, 2 ** 31),
);
const wrongValue = fc.oneof(
  oddString,
  oddNumber,
  fc.constantFrom(null, true, false, [], {}, [null], [[]], { '': null }),
  fc.constantFrom(deep(3000), deep(3000, 'x', true), deep(200)),
  anyJson,
);

/** The valid body with one field (at the top or one level down) replaced, dropped or wrapped in an array. */
function mutated(valid: Record<string, unknown>): fc.Arbitrary<unknown> {
  const paths: string[][] = [];
  for (const [k, v] of Object.entries(valid)) {
    paths.push([k]);
    if (v && typeof v === 'object' && !Array.isArray(v)) for (const k2 of Object.keys(v)) paths.push([k, k2]);
    if (Array.isArray(v) && v.length && v[0] && typeof v[0] === 'object') for (const k2 of Object.keys(v[0])) paths.push([k, '0', k2]);
  }
  const set = (obj: unknown, path: string[], value: unknown, drop = false): unknown => {
    const [head, ...rest] = path as [string, ...string[]];
    const copy: Record<string, unknown> | unknown[] = Array.isArray(obj) ? [...obj] : { ...(obj as Record<string, unknown>) };
    const c = copy as Record<string, unknown>;
    if (rest.length === 0) {
      if (drop) delete c[head];
      else c[head] = value;
    } else c[head] = set(c[head], rest, value, drop);
    return copy;
  };
  const wholeBody = fc.constantFrom<unknown>(
    [valid],
    [valid, valid],
    deep(3000, valid),
    Object.values(valid),
    { ...valid, extra: deep(50) },
    { ...valid, __proto__: { admin: true } },
    { ...valid, constructor: { prototype: { x: 1 } } },
  );
  if (paths.length === 0)
    return fc.oneof(
      wholeBody,
      fc.record({ v: wrongValue }).map(({ v }) => ({ anything: v })),
    );
  return fc.oneof(
    { weight: 6, arbitrary: fc.tuple(fc.constantFrom(...paths), wrongValue).map(([p, v]) => set(valid, p, v)) },
    { weight: 1, arbitrary: fc.constantFrom(...paths).map((p) => set(valid, p, undefined, true)) },
    { weight: 1, arbitrary: fc.tuple(fc.constantFrom(...paths), fc.constantFrom(...paths)).map(([p, q]) => set(set(valid, p, [get(valid, p)]), q, null)) },
    { weight: 1, arbitrary: wholeBody },
  );
}
const get = (obj: unknown, path: string[]): unknown => path.reduce<unknown>((o, k) => (o as Record<string, unknown> | undefined)?.[k], obj);

export function bodies(valid: Record<string, unknown>): fc.Arbitrary<unknown> {
  return fc
    .oneof(
      { weight: 6, arbitrary: mutated(valid) },
      { weight: 2, arbitrary: anyJson },
      { weight: 2, arbitrary: fc.dictionary(fc.string({ unit: 'binary', maxLength: 12 }), anyJson, { maxKeys: 6 }) },
      { weight: 1, arbitrary: fc.anything({ maxDepth: 3 }) },
    )
    .map(asJson);
}
