import { bestBeforeFrom, shelfLifeDays, type ShelfLifeSettings } from '../../../shared/cellar/trace.ts';
import type { Database } from '../../db/database.ts';
import { getSetting } from '../settings/settings.service.ts';
import { batchShelfLifeRow } from './batches.repository.ts';

export async function loadShelfLifeSettings(db: Database): Promise<ShelfLifeSettings> {
  return (await getSetting(db, 'shelf_life')).value;
}

/** The best-before a fill of this batch made at `filledAt` gets (stored on the fill at fill time). */
export async function fillBestBefore(db: Database, batchId: string, filledAt: Date): Promise<Date> {
  const settings = await loadShelfLifeSettings(db);
  const batch = await batchShelfLifeRow(db, batchId);
  return bestBeforeFrom(filledAt, shelfLifeDays({ style: batch.style, shelfLifeDays: batch.shelf_life_days }, settings).days);
}
