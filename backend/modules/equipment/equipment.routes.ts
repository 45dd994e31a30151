import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { z } from 'zod';
import {
  createEquipmentSchema,
  equipmentListQuerySchema,
  equipmentStateChangeSchema,
  labelSheetQuerySchema,
  nextCodeQuerySchema,
  updateEquipmentSchema,
} from '../../../shared/schemas/equipment.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { upcomingBookingsFor } from '../bookings/bookings.service.ts';
import {
  createEquipment,
  equipmentByIds,
  equipmentHistory,
  findEquipment,
  listEquipment,
  nextEquipmentCode,
  setEquipmentState,
  updateEquipment,
} from './equipment.service.ts';
import { renderLabelSheet } from './labels-pdf.service.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { connectCylinderSchema, createInspectionSchema, maintenanceListQuerySchema, refillCylinderSchema } from '../../../shared/schemas/inspections.ts';
import { connectCylinder, cylinderView, refillCylinder } from './cylinders.service.ts';
import { inspectionsDue, listInspections, listMaintenance, recordInspection } from './inspections.service.ts';

const idSchema = z.uuid();

/** The equipment registry: everyone reads it, the admin keeps it, the brewer on duty changes states. */
export function equipmentRoutes({ db, config, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Equipment' });
  router.use(requireUser);

  async function itemOr404(rawId: string) {
    const id = idSchema.safeParse(rawId);
    const item = id.success ? await findEquipment(db, id.data, clock.now()) : undefined;
    if (!item) throw notFound('Equipment');
    return item;
  }

  router.get('/', async (req, res) => {
    const q = equipmentListQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Equipment');
    res.json(await listEquipment(db, q, clock.now()));
  });

  router.get('/labels.pdf', async (req, res) => {
    const q = labelSheetQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Equipment');
    const items = await equipmentByIds(db, [...new Set(q.ids)], clock.now());
    if (items.length !== new Set(q.ids).size) throw notFound('Equipment');
    // Keep the order asked for, so a sheet prints as picked.
    const order = new Map(q.ids.map((id, i) => [id, i]));
    items.sort((a, b) => order.get(a.id)! - order.get(b.id)!);
    const pdf = await renderLabelSheet(items, config.publicUrl, await coopProfile(db));
    res
      .status(200)
      .type('application/pdf')
      .set('Content-Disposition', `inline; filename="cellarwright-labels-${items.length}.pdf"`)
      .set('Cache-Control', 'no-store')
      .send(pdf);
  });

  router.get('/next-code', async (req, res) => {
    // A hint for the admin's add form; the unique constraint on `code` is the guarantee.
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'Equipment');
    const q = nextCodeQuerySchema.parse(req.query);
    res.json({ kind: q.kind, code: await nextEquipmentCode(db, q.kind) });
  });

  router.get('/maintenance', async (req, res) => {
    // Inspections failed, past due or due soon (backend/modules/equipment/inspections.service.ts).
    const q = maintenanceListQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Equipment');
    res.json(await listMaintenance(db, q, clock.now()));
  });

  router.get('/:id', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Equipment');
    const item = await itemOr404(req.params.id);
    const now = clock.now();
    const [history, upcomingBookings, inspections, due, cylinder] = await Promise.all([
      equipmentHistory(db, item.id),
      upcomingBookingsFor(db, item.id, { id: userOf(req).id, ability: req.ability }, now),
      listInspections(db, item.id),
      inspectionsDue(db, item.id, now),
      item.kind === 'co2_cylinder' ? cylinderView(db, item) : Promise.resolve(undefined),
    ]);
    res.json({ equipment: item, history, upcomingBookings, inspections, inspectionsDue: due, ...(cylinder ? { cylinder } : {}) });
  });

  router.post('/:id/inspections', async (req, res) => {
    // The brewer on duty and the admin record inspections, as they change states.
    ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    const input = createInspectionSchema.parse(req.body ?? {});
    const item = await itemOr404(req.params.id);
    const now = clock.now();
    const inspection = await recordInspection(db, item, input, userOf(req).id, now);
    res.status(201).json({ inspection, equipment: await findEquipment(db, item.id, now), inspectionsDue: await inspectionsDue(db, item.id, now) });
  });

  router.post('/:id/connect', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    const input = connectCylinderSchema.parse(req.body ?? {});
    const item = await itemOr404(req.params.id);
    await connectCylinder(db, item, input, userOf(req).id, clock.now());
    res.json({ cylinder: await cylinderView(db, item) });
  });

  router.post('/:id/refill', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    const input = refillCylinderSchema.parse(req.body ?? {});
    const item = await itemOr404(req.params.id);
    await refillCylinder(db, item, input, userOf(req).id, clock.now());
    res.json({ cylinder: await cylinderView(db, (await findEquipment(db, item.id, clock.now())) ?? item) });
  });

  router.post('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'Equipment');
    const input = createEquipmentSchema.parse(req.body ?? {});
    res.status(201).json({ equipment: await createEquipment(db, input, userOf(req).id, clock.now()) });
  });

  router.patch('/:id', async (req, res) => {
    // The registry's details are the admin's; the brewer on duty changes only states (below).
    ForbiddenError.from(req.ability).throwUnlessCan('manage', 'Equipment');
    const input = updateEquipmentSchema.parse(req.body ?? {});
    const item = await itemOr404(req.params.id);
    res.json({ equipment: await updateEquipment(db, item, input, userOf(req).id, clock.now()) });
  });

  router.post('/:id/state', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('update', 'Equipment');
    const input = equipmentStateChangeSchema.parse(req.body ?? {});
    const item = await itemOr404(req.params.id);
    const equipment = await setEquipmentState(db, {
      equipmentId: item.id,
      toState: input.state,
      reason: input.reason,
      actorId: userOf(req).id,
      at: clock.now(),
    });
    res.json({ equipment, history: await equipmentHistory(db, item.id, 20) });
  });

  return router;
}
