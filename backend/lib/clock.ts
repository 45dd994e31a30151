/**
 * The one clock. Every business rule that depends on "now" (billing periods and ageing, due dates,
 * freshness windows, booking rules, reminders, forecasts, overdue kegs) reads it from here, through
 * `deps.clock`, and passes it to SQL as a parameter; nothing in a rule calls `new Date()` or SQL `now()`.
 *
 * Stamps a change writes (`updated_at`, `sent_at`, `voided_at`…) and e-mailed links' lifetimes take it too.
 * PostgreSQL's own `now()` remains only where the instant is a record of when a row was first written,
 * never compared with a rule's "now": column defaults such as `created_at`, and infrastructure whose
 * lifetime is real elapsed time (session expiry, sign-in rate-limit windows, the queue's own timing).
 */
export interface Clock {
  now(): Date;
}

export const systemClock: Clock = { now: () => new Date() };

/**
 * A clock for tests and simulations: it starts at a given instant and runs on with real time (so
 * rows written one after another keep their order), unless frozen. `set`, `advance`, `freeze` move it.
 */
export class ManualClock implements Clock {
  private base: number;
  private startedAt: number;
  private frozen: boolean;

  constructor(at: Date | string, { frozen = false }: { frozen?: boolean } = {}) {
    this.base = new Date(at).getTime();
    if (Number.isNaN(this.base)) throw new Error(`ManualClock: not a time: ${String(at)}`);
    this.startedAt = Date.now();
    this.frozen = frozen;
  }

  now(): Date {
    return new Date(this.frozen ? this.base : this.base + (Date.now() - this.startedAt));
  }

  /** Moves the clock to `at`; it runs on from there unless frozen. */
  set(at: Date | string): this {
    const t = new Date(at).getTime();
    if (Number.isNaN(t)) throw new Error(`ManualClock: not a time: ${String(at)}`);
    this.base = t;
    this.startedAt = Date.now();
    return this;
  }

  advance(ms: number): this {
    return this.set(new Date(this.now().getTime() + ms));
  }

  /** Stops the clock where it is (or at `at`): every call to `now()` then returns the same instant. */
  freeze(at?: Date | string): this {
    if (at !== undefined) this.set(at);
    else this.set(this.now());
    this.frozen = true;
    return this;
  }

  /** Lets a frozen clock run on with real time again. */
  resume(): this {
    this.set(this.now());
    this.frozen = false;
    return this;
  }
}
