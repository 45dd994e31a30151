import type { Deps } from './lib/deps.ts';
import { createTransport, deliverMail, type OutgoingMail } from './lib/mailer.ts';
import { advanceBookingStates } from './modules/bookings/bookings.service.ts';
import { startCarbonationWorkers } from './modules/carbonation/carbonation.workers.ts';
import { startEquipmentWorkers } from './modules/equipment/equipment.workers.ts';

/** Registers the queue workers; every instance may run them, pg-boss hands each job to one. */
export async function startWorkers(deps: Deps): Promise<void> {
  const { config, queue, db, clock } = deps;
  const transport = createTransport(config);
  await queue.work<OutgoingMail>('email.send', { pollingIntervalSeconds: 0.5 }, async (jobs) => {
    for (const job of jobs) await deliverMail(config, transport, job.data);
  });
  // Bookings move along with the clock: booked → in use at the start, → finished at the end.
  await queue.work('bookings.advance', async () => {
    await advanceBookingStates(db, clock.now());
  });
  await queue.schedule('bookings.advance', '*/5 * * * *');
  // Carbonation: the fast-start reminder to lower the pressure.
  await startCarbonationWorkers(deps);
  // Equipment: lapsing freshness windows and inspections come due.
  await startEquipmentWorkers(deps);
}
