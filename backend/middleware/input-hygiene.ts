import type { RequestHandler } from 'express';
import { HttpProblem, type ProblemFieldError } from '../lib/http-problem.ts';

/** A lone half of a UTF-16 surrogate pair: no character at all, and PostgreSQL refuses it. */
const LONE_SURROGATE = '[\\uD800-\\uDBFF](?![\\uDC00-\\uDFFF])|(?<![\\uD800-\\uDBFF])[\\uDC00-\\uDFFF]';
/** In body text (a note, a reason): C0 control characters except tab, line feed and carriage return; DEL. */
const BODY_TEXT = new RegExp(`[\\u0000-\\u0008\\u000B\\u000C\\u000E-\\u001F\\u007F]|${LONE_SURROGATE}`);
/** In a query string or the address (search words, filters, ids): every C0 control character and DEL. */
const LINE_TEXT = new RegExp(`[\\u0000-\\u001F\\u007F]|${LONE_SURROGATE}`);

/** No request body the API takes nests anywhere near this deep. */
export const MAX_BODY_DEPTH = 32;
const MAX_ERRORS = 20;

const named = (s: string) => {
  // eslint-disable-next-line no-control-regex -- finding control characters is this regex's job
  const m = /[\u0000-\u001F\u007F]/.exec(s);
  return m ? `U+${m[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}` : 'a lone surrogate';
};

/** The field paths (as the validation errors write them: `steps.0.note`) whose text or key holds a refused character. */
function walk(root: unknown, refused: RegExp, errors: ProblemFieldError[]): void {
  const stack: { value: unknown; path: string[] }[] = [{ value: root, path: [] }];
  while (stack.length && errors.length < MAX_ERRORS) {
    const { value, path } = stack.pop()!;
    if (typeof value === 'string') {
      if (refused.test(value))
        errors.push({ path: path.join('.'), message: `Contains a control character (${named(value)}), which this field does not take.` });
      continue;
    }
    if (value === null || typeof value !== 'object' || Buffer.isBuffer(value)) continue;
    if (path.length >= MAX_BODY_DEPTH) {
      errors.push({ path: path.join('.'), message: `Nested more than ${MAX_BODY_DEPTH} levels deep.` });
      continue;
    }
    const entries = Array.isArray(value) ? (value as unknown[]).map((v, i) => [String(i), v] as const) : Object.entries(value as Record<string, unknown>);
    for (let i = entries.length - 1; i >= 0; i--) {
      const [key, v] = entries[i]!;
      if (!Array.isArray(value) && refused.test(key)) {
        errors.push({ path: [...path, key].join('.'), message: `The field name contains a control character (${named(key)}).` });
        continue;
      }
      stack.push({ value: v, path: [...path, key] });
    }
  }
}

/**
 * Refuses control characters (and lone surrogates) in every text the API is sent, with a 422 problem
 * naming each field, before any handler or query sees them: in JSON bodies (tab and line breaks are
 * fine there, for notes), and in query strings and the address (where nothing takes them). Bodies
 * nested absurdly deep are refused the same way. Runs after the JSON parser; leaves raw bodies (the
 * payment webhook) alone.
 */
export const inputHygiene: RequestHandler = (req, _res, next) => {
  const errors: ProblemFieldError[] = [];
  for (const segment of req.path.split('/')) {
    let decoded: string;
    try {
      decoded = decodeURIComponent(segment);
    } catch {
      continue; // the router answers a malformed escape itself (400)
    }
    if (LINE_TEXT.test(decoded)) {
      errors.push({ path: '', message: `The address contains a control character (${named(decoded)}).` });
      break;
    }
  }
  walk(req.query, LINE_TEXT, errors);
  walk(req.body, BODY_TEXT, errors);
  if (!errors.length) return next();
  next(new HttpProblem(422, 'Validation failed', errors.map((e) => (e.path ? `${e.path}: ${e.message}` : e.message)).join('; '), errors));
};
