import { Router } from 'express';
import { sql } from 'kysely';
import type { Deps } from '../../lib/deps.ts';

export function healthRoutes({ db }: Deps): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    try {
      await sql`select 1`.execute(db);
      res.json({ ok: true, db: 'up' });
    } catch {
      res.status(503).json({ ok: false, db: 'down' });
    }
  });
  return router;
}
