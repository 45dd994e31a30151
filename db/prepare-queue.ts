// Creates pg-boss's schema and queues ahead of time (the test template; a fresh deployment).
import { createQueue } from '../backend/lib/queue.ts';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is required');
const boss = await createQueue(url);
await boss.stop({ graceful: false, wait: true });
