import type { Deps } from '../../lib/deps.ts';
import { carbonationReminderQueue, sendDueReminders, sendLowerPressureReminder } from './carbonation.service.ts';

export const carbonationPeriodicQueue = 'carbonation.periodic';

/**
 * Carbonation's queued work: the fast-start reminder to lower the pressure, and a periodic pass that
 * sends any lowering reminder whose queued job never ran (a plan recorded with a past start, say).
 */
export async function startCarbonationWorkers({ db, queue, clock }: Deps): Promise<void> {
  await queue.work<{ planId: string }>(carbonationReminderQueue, { pollingIntervalSeconds: 2 }, async (jobs) => {
    for (const job of jobs) await sendLowerPressureReminder(db, queue, job.data.planId, clock.now());
  });
  await queue.work(carbonationPeriodicQueue, { pollingIntervalSeconds: 30 }, async () => {
    await sendDueReminders(db, queue, clock.now());
  });
  await queue.schedule(carbonationPeriodicQueue, '*/15 * * * *');
}
