import type { Deps } from '../../lib/deps.ts';
import { applyInspectionLapses } from './inspections.service.ts';
import { applyFreshnessLapses } from './vessel-state.ts';

export const equipmentPeriodicQueue = 'cellar.periodic';

/**
 * Equipment's periodic pass: writes lapsed freshness windows and inspections that have come due down
 * (reads already treat them as lapsed and refuse them).
 */
export async function startEquipmentWorkers({ db, queue, clock }: Deps): Promise<void> {
  await queue.work(equipmentPeriodicQueue, { pollingIntervalSeconds: 30 }, async () => {
    await applyFreshnessLapses(db, clock.now());
    await applyInspectionLapses(db, clock.now());
  });
  await queue.schedule(equipmentPeriodicQueue, '*/15 * * * *');
}
