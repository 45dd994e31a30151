import type { RequestHandler } from 'express';

/**
 * The session middleware reads the session before the route (a store error there goes on to the
 * problem handler: 503 when the database is unreachable) and saves or touches it while the answer
 * is being written. An error from that late save arrives after the problem handler has had its
 * turn, and Express's last resort would cut the connection mid-answer; it is logged instead and
 * the answer completes.
 */
export function reportLateSessionErrors(sessionMiddleware: RequestHandler): RequestHandler {
  return (req, res, next) => {
    let passed = false;
    sessionMiddleware(req, res, (err?: unknown) => {
      if (!passed) {
        passed = true;
        return next(err);
      }
      if (err) req.log?.warn({ err: { message: (err as Error).message, code: (err as { code?: string }).code } }, 'session not saved after the answer');
    });
  };
}
