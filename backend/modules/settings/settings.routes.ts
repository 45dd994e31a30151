import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { settingKeySchema, settingKeys, settingSections } from '../../../shared/schemas/settings.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { getSetting, saveSetting } from './settings.service.ts';

/** The co-op's settings, one section per key: read by the rota and the treasurer, changed by the admin. */
export function settingsRoutes({ db, clock }: Deps): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Setting');
    const sections = await Promise.all(
      settingKeys.map(async (key) => {
        const s = settingSections[key];
        return { title: s.title, description: s.description, ...(await getSetting(db, key)), defaults: s.defaults };
      }),
    );
    res.json({ sections });
  });

  router.get('/:key', async (req, res) => {
    const key = settingKeySchema.safeParse(req.params.key);
    if (!key.success) throw notFound('Setting');
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Setting');
    res.json(await getSetting(db, key.data));
  });

  router.put('/:key', async (req, res) => {
    const key = settingKeySchema.safeParse(req.params.key);
    if (!key.success) throw notFound('Setting');
    ForbiddenError.from(req.ability).throwUnlessCan('update', 'Setting');
    const value = settingSections[key.data].schema.parse(req.body ?? {});
    const saved = await saveSetting(db, key.data, value, userOf(req).id, clock.now());
    res.json(saved);
  });

  return router;
}
