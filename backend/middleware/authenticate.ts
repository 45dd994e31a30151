import type { Request, RequestHandler } from 'express';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Database } from '../db/database.ts';
import { HttpProblem, unauthorized } from '../lib/http-problem.ts';
import { findActiveUser, type SessionUser } from '../modules/auth/auth.service.ts';
import { sessionAccount } from '../modules/auth/session-store.ts';
import { anonymousCsrfCookieOf, csrfKey, isValidAnonymousCsrfToken, sameToken, sentByBrowser } from '../modules/auth/csrf.ts';

/** Sets req.user and req.ability; nothing else builds an ability. A deactivated user's session ends here too. */
export function authenticate(db: Database): RequestHandler {
  return async (req, _res, next) => {
    req.user = null;
    const userId = req.session?.userId;
    if (userId) {
      // The session store read the person with the session (one statement); a session begun since is looked up.
      const account = sessionAccount(req.session);
      req.user = account === undefined ? await findActiveUser(db, userId) : account;
      if (!req.user) await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
    }
    req.ability = defineAbilityFor(req.user);
    next();
  };
}

export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) throw unauthorized();
  next();
};

/** The signed-in person of a request behind `requireUser`; a 401 problem if there is none. */
export function userOf(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}

const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS']);

const csrfRefused = () => new HttpProblem(403, 'CSRF token missing or wrong', 'Fetch a token from GET /api/auth/csrf and send it as X-CSRF-Token.');

/**
 * Every state-changing request must send its CSRF token: a signed-in session the token kept in its session;
 * an anonymous browser request (sign-in, reset, invitation, unlock) the signed token of its `cw.csrf` cookie.
 * An anonymous request from a client that is no browser sends no cookies and needs none, unless it sends one.
 */
export function csrfProtection(sessionSecret: string, exempt: string[] = []): RequestHandler {
  const key = csrfKey(sessionSecret);
  return (req, _res, next) => {
    if (safeMethods.has(req.method) || exempt.some((p) => req.path.startsWith(p))) return next();
    const sent = req.get('x-csrf-token');
    if (req.session?.userId) {
      if (!sameToken(sent, req.session.csrfToken)) throw csrfRefused();
      return next();
    }
    const cookie = anonymousCsrfCookieOf(req);
    if (sent === undefined && cookie === undefined && !sentByBrowser(req)) return next();
    if (!sameToken(sent, cookie) || !isValidAnonymousCsrfToken(key, sent)) throw csrfRefused();
    next();
  };
}
