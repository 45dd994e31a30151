import { ForbiddenError } from '@casl/ability';
import { Router, type Request, type RequestHandler } from 'express';
import type { SubjectName } from '../../shared/permissions/ability.ts';
import { requireUser, userOf } from '../middleware/authenticate.ts';
import type { SessionUser } from '../modules/auth/auth.service.ts';
import { canAll } from './authz.ts';
import { uuidParams } from './uuid-params.ts';

/** What reads a value from untrusted input as a zod schema does (a schema, or a function of one). */
export interface Parser<T> {
  parse(input: unknown): T;
}

/**
 * A router for signed-in people only (401 otherwise), its id parameters checked as UUIDs before any handler
 * runs (`uuidParams`): `signedInRouter({ id: 'Keg' })`.
 */
export function signedInRouter(ids: Record<string, string> = {}): Router {
  const router = uuidParams(Router(), ids);
  router.use(requireUser);
  return router;
}

/** Whom a list is for: the request, and the person it is narrowed to (undefined when they may read every row). */
export interface ListScope {
  req: Request;
  restrictTo: string | undefined;
}

/**
 * `GET` a list: 403 unless the person may `read` the subject at all (checked first, deny by default), then the
 * query parsed (422 when it is not valid), then the page `load` returns. `restrictTo` is undefined when the
 * person may read every row and their own id when a rule's condition narrows what they see, for `load` to
 * repeat that condition in SQL.
 */
export function listHandler<Q>(query: Parser<Q>, subjectName: SubjectName, load: (q: Q, scope: ListScope) => Promise<unknown>): RequestHandler {
  return async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', subjectName);
    const q = query.parse(req.query);
    const restrictTo = canAll(req.ability, 'read', subjectName) ? undefined : userOf(req).id;
    res.json(await load(q, { req, restrictTo }));
  };
}

/**
 * `POST` a new record: 403 unless the person may `create` the subject (checked first), then the body parsed
 * (422), then 201 with what `create` returns.
 */
export function createHandler<I>(body: Parser<I>, subjectName: SubjectName, create: (input: I, actor: SessionUser) => Promise<unknown>): RequestHandler {
  return async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', subjectName);
    const input = body.parse(req.body ?? {});
    res.status(201).json(await create(input, userOf(req)));
  };
}
