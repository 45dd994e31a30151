import { expect } from 'vitest';
import { DAY } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, signInAs, useTestContext } from './context.ts';

/** `days` whole days after `start`, as an ISO time. */
export const daysAfter = (start: string, days: number) => new Date(Date.parse(start) + days * DAY).toISOString();

/** A planned amber ale of the client's own, made through the API (201 asserted); `body` overrides the defaults. */
export async function newBatch(client: ApiClient, body: Record<string, unknown> = {}) {
  const res = await client.post('/api/batches', { name: 'Test amber', style: 'Amber ale', volumeLiters: 23, targetOg: 1.052, targetFg: 1.012, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.batch as { id: string; status: string; ownerId: string };
}

/** The batch files' context and signed-in clients, set before the file's tests run (`useBatchFile()`). */
export let ctx: TestContext;
export let member: ApiClient, member2: ApiClient, brewer: ApiClient, treasurer: ApiClient, admin: ApiClient;

/** A fresh context for the file with two members, the brewer on duty, the treasurer and the admin signed in. */
export function useBatchFile() {
  useTestContext(async (created) => {
    ctx = created;
    [member, member2, brewer, treasurer, admin] = await signInAs(ctx, 'member', 'member2', 'brewer', 'treasurer', 'admin');
  });
}
