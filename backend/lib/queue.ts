import PgBoss from 'pg-boss';

export const queues = ['email.send', 'bookings.advance', 'cellar.carbonation-reminder', 'cellar.periodic'] as const;

/** pg-boss on the application's own PostgreSQL: jobs survive restarts and are shared by all instances. */
export async function createQueue(connectionString: string, extraQueues: string[] = []): Promise<PgBoss> {
  const boss = new PgBoss({ connectionString, max: 4, schema: 'pgboss' });
  boss.on('error', (err) => console.error('queue error', err.message));
  await boss.start();
  for (const name of [...queues, ...extraQueues]) await boss.createQueue(name);
  return boss;
}
