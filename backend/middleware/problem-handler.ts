import { ForbiddenError } from '@casl/ability';
import type { ErrorRequestHandler, RequestHandler } from 'express';
import multer from 'multer';
import { ZodError } from 'zod';
import { isDatabaseUnavailable } from '../db/database.ts';
import { HttpProblem, type ProblemFieldError } from '../lib/http-problem.ts';

function send(res: Parameters<ErrorRequestHandler>[2], status: number, body: Record<string, unknown>) {
  res
    .status(status)
    .type('application/problem+json')
    .json({ type: 'about:blank', status, ...body });
}

export function zodErrors(err: ZodError): ProblemFieldError[] {
  return err.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
}

/** PostgreSQL data exceptions caused by the value sent: invalid_text_representation, character_not_in_repertoire,
 * untranslatable_character, numeric_value_out_of_range, string_data_right_truncation, invalid_datetime_format,
 * datetime_field_overflow. */
const PG_BAD_INPUT = new Set(['22P02', '22021', '22P05', '22003', '22001', '22007', '22008']);

/** Seconds a client is asked to wait when the database is unreachable. */
export const DB_RETRY_AFTER_SECONDS = 5;

/** Every error leaves the API as RFC 9457 problem JSON. */
/** What the error handler reads from errors thrown by libraries (body parser, pg, http-errors). */
type LooseError = { code?: unknown; message?: string; status?: unknown; statusCode?: unknown; type?: unknown; limit?: unknown } | null | undefined;

export const problemHandler: ErrorRequestHandler = (thrown: unknown, req, res, _next) => {
  if (res.headersSent) return;
  const err = thrown as LooseError;
  if (err instanceof HttpProblem) {
    return send(res, err.status, { type: err.type, title: err.title, detail: err.detail, errors: err.errors, ...err.extra });
  }
  if (err instanceof ZodError) {
    const errors = zodErrors(err);
    return send(res, 422, {
      title: 'Validation failed',
      detail: errors.map((e) => (e.path ? `${e.path}: ${e.message}` : e.message)).join('; '),
      errors,
    });
  }
  if (err instanceof ForbiddenError) {
    return send(res, 403, { title: 'Forbidden', detail: 'You may not do this.' });
  }
  if (err instanceof multer.MulterError) {
    if (err.code === 'LIMIT_FILE_SIZE') return send(res, 413, { title: 'File too large', detail: err.message });
    return send(res, 400, { title: 'Bad upload', detail: err.message });
  }
  // Text PostgreSQL cannot read as the type asked for (a malformed uuid, a NUL byte, a number out of range):
  // bad input that slipped past validation, never a server fault.
  if (typeof err?.code === 'string' && PG_BAD_INPUT.has(err.code)) {
    req.log?.warn({ err }, 'the database refused a value sent');
    return send(res, 422, {
      title: 'Validation failed',
      detail: 'A value sent is not valid here.',
      errors: [{ path: '', message: 'A value sent is not valid here.' }],
    });
  }
  if (isDatabaseUnavailable(err)) {
    req.log?.warn({ err: { message: err?.message, code: err?.code } }, 'database unavailable');
    res.set('Retry-After', String(DB_RETRY_AFTER_SECONDS));
    return send(res, 503, { title: 'Service unavailable', detail: 'The database is unreachable; try again shortly.' });
  }
  const status = typeof err?.status === 'number' ? err.status : typeof err?.statusCode === 'number' ? err.statusCode : 500;
  if (err?.type === 'entity.too.large')
    return send(res, 413, { title: 'Request body too large', detail: `The body may be at most ${String(err.limit)} bytes.` });
  if (err?.type === 'entity.parse.failed') return send(res, 400, { title: 'Malformed JSON', detail: 'The request body is not valid JSON.' });
  if (status >= 400 && status < 500) return send(res, status, { title: err?.message ?? 'Bad request', detail: err?.message });
  req.log?.error({ err }, 'unhandled error');
  return send(res, 500, { title: 'Internal server error', detail: 'Something went wrong on our side.' });
};

export const apiNotFound: RequestHandler = (req, res) => {
  send(res, 404, { title: 'Not found', detail: `No API route ${req.method} ${req.path}.` });
};
