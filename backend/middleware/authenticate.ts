import type { RequestHandler } from 'express';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import type { Database } from '../db/database.ts';
import { HttpProblem, unauthorized } from '../lib/http-problem.ts';
import { findActiveUser } from '../modules/auth/auth.service.ts';

/** Sets req.user and req.ability; nothing else builds an ability. A deactivated user's session ends here too. */
export function authenticate(db: Database): RequestHandler {
  return async (req, _res, next) => {
    req.user = null;
    const userId = req.session?.userId;
    if (userId) {
      req.user = await findActiveUser(db, userId);
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

const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS']);

/** A signed-in session must send its CSRF token on every state-changing request. */
export function csrfProtection(exempt: string[] = []): RequestHandler {
  return (req, _res, next) => {
    if (safeMethods.has(req.method) || exempt.some((p) => req.path.startsWith(p))) return next();
    if (!req.session?.userId) return next();
    const sent = req.get('x-csrf-token');
    if (!sent || !req.session.csrfToken || sent !== req.session.csrfToken) {
      throw new HttpProblem(403, 'CSRF token missing or wrong', 'Fetch a token from GET /api/auth/csrf and send it as X-CSRF-Token.');
    }
    next();
  };
}
