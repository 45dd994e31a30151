import type { Deps } from '../../lib/deps.ts';
import { applyInspectionLapses } from '../equipment/inspections.service.ts';
import { carbonationReminderQueue, sendDueReminders, sendLowerPressureReminder } from '../carbonation/carbonation.service.ts';
import { applyFreshnessLapses } from './vessel-state.ts';

export const cellarPeriodicQueue = 'cellar.periodic';
export const cellarQueues = [carbonationReminderQueue, cellarPeriodicQueue] as const;

/**
 * The cellar's queued work: the fast-start reminder to lower the pressure, and a periodic pass
 * that writes lapsed freshness windows and inspections that have come due down (reads already
 * treat them as lapsed and refuse them) and sends any
 * lowering reminder whose queued job never ran (a plan recorded with a past start, say).
 */
export async function startCellarWorkers({ db, queue, clock }: Deps): Promise<void> {
  await queue.work<{ planId: string }>(carbonationReminderQueue, { pollingIntervalSeconds: 2 }, async (jobs) => {
    for (const job of jobs) await sendLowerPressureReminder(db, queue, job.data.planId, clock.now());
  });
  await queue.work(cellarPeriodicQueue, { pollingIntervalSeconds: 30 }, async () => {
    await applyFreshnessLapses(db, clock.now());
    await applyInspectionLapses(db, clock.now());
    await sendDueReminders(db, queue, clock.now());
  });
  await queue.schedule(cellarPeriodicQueue, '*/15 * * * *');
}
