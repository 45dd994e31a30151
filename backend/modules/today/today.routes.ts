import { Router } from 'express';
import { subject } from '../../../shared/permissions/ability.ts';
import type { Today } from '../../../shared/schemas/today.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { memberBalance } from '../billing/invoices.service.ts';
import { billingSummary } from '../billing/reports.service.ts';
import { listMaintenance } from '../equipment/inspections.service.ts';
import { coopToday, getBillingProfile } from '../settings/settings.service.ts';
import { cellarSection, memberSection } from './today.service.ts';

/** `GET /api/today`: one request for the Today screen; each section only for those whose abilities cover it. */
export function todayRoutes({ db, clock }: Deps): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req, res) => {
    const user = userOf(req);
    const ability = req.ability;
    const now = clock.now();
    const out: Today = { generatedAt: now.toISOString() };
    const tasks: Promise<void>[] = [];

    if (user.roles.includes('member')) {
      tasks.push(
        (async () => {
          const section = await memberSection(db, user.id, now);
          let balance = null;
          if (ability.can('read', subject('Invoice', { memberId: user.id }))) {
            const [{ today }, profile] = await Promise.all([coopToday(db, now), getBillingProfile(db)]);
            balance = await memberBalance(db, user.id, today, profile.currency);
          }
          out.member = { ...section, balance };
        })(),
      );
    }
    if (ability.can('create', 'SanitationCycle')) {
      tasks.push(
        Promise.all([
          cellarSection(db, now, ability.can('readOwner', 'Keg')),
          listMaintenance(db, { page: 1, pageSize: 10, sort: 'dueAt', order: 'asc', q: undefined }, now),
        ]).then(([s, due]) => {
          out.cellar = { ...s, inspectionsDue: { total: due.total, items: due.items } };
        }),
      );
    }
    if (canAll(ability, 'read', 'Invoice')) {
      tasks.push(
        billingSummary(db, now).then((s) => {
          out.money = {
            currency: s.currency,
            unpaid: s.unpaid,
            overdue: s.overdue,
            drafts: s.drafts,
            ageing: s.ageing,
            lastRun: s.lastRun,
            suggestedPeriod: s.suggestedPeriod,
          };
        }),
      );
    }
    await Promise.all(tasks);
    res.json(out);
  });
  return router;
}
