import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { calendarFeedKinds, feedForToken, listFeeds, renderFeed, renewFeed } from './calendar-feed.service.ts';

const renewSchema = z.object({ kind: z.enum(['member', 'rota']).default('member') }).strict();

/** `/api/calendar-feeds`: the signed-in person's private calendar links, and a new link (revoking the old). */
export function calendarFeedsRoutes({ db, config, clock }: Deps): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/', async (req, res) => {
    const me = userOf(req).id;
    const kinds = calendarFeedKinds.filter((kind) => req.ability.can('read', subject('CalendarFeed', { ownerId: me, kind })));
    res.json({ feeds: await listFeeds(db, config, me, kinds) });
  });

  router.post('/', async (req, res) => {
    const { kind } = renewSchema.parse(req.body ?? {});
    ForbiddenError.from(req.ability).throwUnlessCan('update', subject('CalendarFeed', { ownerId: userOf(req).id, kind }));
    res.status(201).json({ feed: await renewFeed(db, config, userOf(req).id, kind, clock.now()) });
  });

  return router;
}

/**
 * `/ical/<token>.ics`: the feed itself, for calendar programs (no session, no cookie): the token is
 * the credential. An unknown, revoked or malformed token is a 404 like any missing page.
 */
export function calendarFeedPublicRoutes({ db, config, clock }: Deps): Router {
  const router = Router();
  router.get('/:file', async (req, res) => {
    const m = /^([A-Za-z0-9_-]+)\.ics$/.exec(String(req.params.file));
    const feed = m ? await feedForToken(db, m[1]!) : undefined;
    if (!feed) throw notFound('Calendar feed');
    const body = await renderFeed(db, config, feed, clock.now());
    res
      .type('text/calendar; charset=utf-8')
      .set('Cache-Control', 'private, no-store')
      .set('Content-Disposition', `inline; filename="${feed.kind === 'rota' ? 'cellar-rota' : 'my-cellar'}.ics"`)
      .set('X-Robots-Tag', 'noindex')
      .send(body);
  });
  return router;
}
