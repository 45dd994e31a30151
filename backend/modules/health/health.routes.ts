import { Router } from 'express';
import type { Deps } from '../../lib/deps.ts';
import { DB_RETRY_AFTER_SECONDS } from '../../middleware/problem-handler.ts';
import { probeDatabase } from './health.service.ts';

export function healthRoutes({ db }: Deps): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    try {
      await probeDatabase(db);
      res.json({ ok: true, db: 'up' });
    } catch {
      res.status(503).set('Retry-After', String(DB_RETRY_AFTER_SECONDS)).set('Cache-Control', 'no-store').type('application/problem+json').json({
        type: 'about:blank',
        status: 503,
        title: 'Service unavailable',
        detail: 'The database is unreachable; try again shortly.',
        ok: false,
        db: 'down',
      });
    }
  });
  return router;
}
