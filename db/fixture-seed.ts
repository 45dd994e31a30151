// `tsx db/fixture-seed.ts`: build the small test fixture (db/fixtures) instead of the demo co-op. Runs once per database.
import { createDb } from '../backend/db/database.ts';
import { runFixtures } from './fixtures/index.ts';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is required');
const { db } = createDb(url, 2);
try {
  console.log((await runFixtures(db)) ? 'fixture built' : 'fixture already built');
} finally {
  await db.destroy();
}
