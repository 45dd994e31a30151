import type { Router } from 'express';
import { notFound } from './http-problem.ts';

/** What PostgreSQL's uuid type reads in the form the API writes it (hyphenated, any version or case). */
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const isUuid = (value: unknown): value is string => typeof value === 'string' && UUID.test(value);

/**
 * Checks a router's id parameters before any of its handlers runs. An id that is not a UUID names
 * nothing, so it gets the same 404 problem as an id that names no row (never a database error, and
 * before any query). Every route of the router with one of these parameters gets the check:
 * `uuidParams(router, { id: 'Batch', readingId: 'Reading' })`.
 */
export function uuidParams(router: Router, params: Record<string, string>): Router {
  for (const [name, what] of Object.entries(params)) {
    router.param(name, (_req, _res, next, value: unknown) => next(isUuid(value) ? undefined : notFound(what)));
  }
  return router;
}
