// `npm run seed`: build the demo co-op. Each seed runs once per database (recorded in seed_run).
import { createDb } from '../backend/db/database.ts';
import { runSeeds } from './seeds/index.ts';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is required');
const { db } = createDb(url, 2);
try {
  const ran = await runSeeds(db);
  console.log(ran.length ? `seeded: ${ran.join(', ')}` : 'demo co-op already seeded');
} finally {
  await db.destroy();
}
