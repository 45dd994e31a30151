import type { ManualClock } from '../../backend/lib/clock.ts';

/**
 * The suite's calendar. The template database is seeded as of TEST_TODAY and every test context's
 * clock starts at TEST_NOW, whatever the machine's clock says, so no test depends on the day it runs.
 * A test that needs another day moves its context's clock (`ctx.clock.set(…)`).
 */
export const TEST_TODAY = '2026-12-01';
export const TEST_NOW = '2026-12-02T10:00:00Z';

/** An instant years away from the suite's calendar and from any machine date the suite runs on. */
export const FAR_AHEAD = '2031-03-14T09:30:00.000Z';

/** `at` moved on by `ms`, as an ISO time. */
export const laterBy = (at: string, ms: number) => new Date(Date.parse(at) + ms).toISOString();

/**
 * Runs `fn` with `clock` stopped at `at` (`fn` may move it further), then lets the clock run on from
 * where it was, so the tests after it keep their day.
 */
export async function withClockAt<T>(clock: ManualClock, at: string, fn: () => Promise<T>): Promise<T> {
  const was = clock.now();
  clock.freeze(at);
  try {
    return await fn();
  } finally {
    clock.set(was).resume();
  }
}
