/**
 * The suite's calendar. The template database is seeded as of TEST_TODAY and every test context's
 * clock starts at TEST_NOW, whatever the machine's clock says, so no test depends on the day it runs.
 * A test that needs another day moves its context's clock (`ctx.clock.set(…)`).
 */
export const TEST_TODAY = '2026-12-01';
export const TEST_NOW = '2026-12-02T10:00:00Z';
