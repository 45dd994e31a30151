// `npm run migrate`: bring DATABASE_URL's schema up to date.
import { createDb } from '../backend/db/database.ts';
import { migrateToLatest } from '../backend/db/migrate.ts';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is required');
const { db } = createDb(url, 2);
try {
  await migrateToLatest(db);
} finally {
  await db.destroy();
}
