import type { Deps } from '../../lib/deps.ts';
import { carbonationReminderQueue, sendLowerPressureReminder } from '../carbonation/carbonation.service.ts';
import { applyFreshnessLapses } from './vessel-state.ts';

export const freshnessLapseQueue = 'cellar.freshness-lapse';
export const cellarQueues = [carbonationReminderQueue, freshnessLapseQueue] as const;

/**
 * The cellar's queued work: the fast-start reminder to lower the pressure, and a periodic pass
 * that writes lapsed freshness windows down (reads already treat them as lapsed).
 */
export async function startCellarWorkers({ db, queue }: Deps): Promise<void> {
  await queue.work<{ planId: string }>(carbonationReminderQueue, { pollingIntervalSeconds: 2 }, async (jobs) => {
    for (const job of jobs) await sendLowerPressureReminder(db, queue, job.data.planId);
  });
  await queue.work(freshnessLapseQueue, { pollingIntervalSeconds: 30 }, async () => {
    await applyFreshnessLapses(db);
  });
  await queue.schedule(freshnessLapseQueue, '*/15 * * * *');
}
