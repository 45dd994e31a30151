import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import { bookingListQuerySchema, createBookingSchema } from '../../../shared/schemas/booking.ts';
import type { Deps } from '../../lib/deps.ts';
import { HttpProblem, notFound } from '../../lib/http-problem.ts';
import { enqueueMail, type OutgoingMail } from '../../lib/mailer.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { coopProfile, getBookingRules } from '../settings/settings.service.ts';
import { cancellationMail, confirmationMail } from './bookings.mail.ts';
import { cancelBooking, createBooking, findBooking, listBookings, toBookingDto } from './bookings.service.ts';

const idSchema = z.uuid();

export function bookingsRoutes({ db, config, queue, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Booking' });
  router.use(requireUser);

  /** Queued after the commit; a mail that cannot be queued is logged, never the booking's failure. */
  async function queueMail(log: { error: (o: object, m: string) => void } | undefined, mail: OutgoingMail) {
    try {
      await enqueueMail(queue, mail);
    } catch (err) {
      log?.error({ err }, 'could not queue booking e-mail');
    }
  }

  /** The co-op's booking rules, for the booking form (members may not read Settings as a whole). */
  router.get('/rules', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Booking');
    res.json({ rules: await getBookingRules(db) });
  });

  router.get('/', async (req, res) => {
    const q = bookingListQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Booking');
    res.json(await listBookings(db, q, { id: userOf(req).id, ability: req.ability }));
  });

  router.get('/:id', async (req, res) => {
    const id = idSchema.safeParse(req.params.id);
    const row = id.success ? await findBooking(db, id.data) : undefined;
    if (!row || !req.ability.can('read', subject('Booking', { ownerId: row.owner_id }))) throw notFound('Booking');
    res.json({ booking: toBookingDto(row, { id: userOf(req).id, ability: req.ability }) });
  });

  router.post('/', async (req, res) => {
    if (!req.ability.can('create', 'Booking')) throw new HttpProblem(403, 'Forbidden', 'Your roles do not include booking equipment.');
    const input = createBookingSchema.parse(req.body ?? {});
    const actor = userOf(req);
    const ownerId = input.ownerId ?? actor.id;
    if (!req.ability.can('create', subject('Booking', { ownerId }))) {
      throw new HttpProblem(
        403,
        'Forbidden',
        ownerId === actor.id ? 'Your roles do not include booking equipment.' : 'Only the admin may book for another member.',
      );
    }
    const created = await createBooking(db, { ...input, ownerId }, { id: actor.id, ability: req.ability }, clock.now());
    await queueMail(
      req.log,
      confirmationMail(created.booking, created.owner, await coopProfile(db), config, clock.now(), created.owner.id === actor.id ? undefined : actor.name),
    );
    res.status(201).json({ booking: created.booking });
  });

  router.delete('/:id', async (req, res) => {
    const id = idSchema.safeParse(req.params.id);
    if (!id.success) throw notFound('Booking');
    const actor = userOf(req);
    const done = await cancelBooking(db, id.data, { id: actor.id, name: actor.name, ability: req.ability }, clock.now());
    await queueMail(
      req.log,
      cancellationMail(done.booking, done.owner, await coopProfile(db), config, clock.now(), done.owner.id === actor.id ? 'you' : actor.name),
    );
    res.status(204).end();
  });

  return router;
}
