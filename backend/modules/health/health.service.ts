import { sql } from 'kysely';
import type { Deps } from '../../lib/deps.ts';

/** The probe never waits longer than this: a load balancer's check must not hang on a dead database. */
export const HEALTH_PROBE_TIMEOUT_MS = 1000;

/** Resolves when `select 1` answers within `timeoutMs`; rejects when it fails or takes longer. */
export async function probeDatabase(db: Deps['db'], timeoutMs = HEALTH_PROBE_TIMEOUT_MS): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_resolve, reject) => {
    timer = setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs);
  });
  const probe = sql`select 1`.execute(db);
  // A probe that loses the race may still fail later; that is expected, not an unhandled rejection.
  probe.catch(() => undefined);
  try {
    await Promise.race([probe, timeout]);
  } finally {
    clearTimeout(timer);
  }
}
