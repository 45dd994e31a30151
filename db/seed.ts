// `npm run seed`: build the demo co-op. Each seed runs once per database (recorded in seed_run).
// The demo is seeded as of SEED_TODAY (YYYY-MM-DD), by default today in the co-op's time zone.
import { createDb } from '../backend/db/database.ts';
import { seedToday } from './seeds/demo-calendar.ts';
import { runSeeds } from './seeds/index.ts';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is required');
const { db } = createDb(url, 2);
try {
  const today = await seedToday(db);
  const ran = await runSeeds(db, { today });
  console.log(ran.length ? `seeded as of ${today}: ${ran.join(', ')}` : 'demo co-op already seeded');
} finally {
  await db.destroy();
}
