import { afterEach, describe, expect, it, vi } from 'vitest';
import { ManualClock, systemClock } from '../clock.ts';

describe('the clock', () => {
  afterEach(() => {
    vi.useRealTimers();
  });

  it('the system clock reads the machine’s time', () => {
    vi.useFakeTimers({ now: new Date('2031-07-15T12:00:00Z') });
    expect(systemClock.now().toISOString()).toBe('2031-07-15T12:00:00.000Z');
  });

  it('a manual clock starts where it is told, whatever the machine’s date, and runs on with real time', () => {
    vi.useFakeTimers({ now: new Date('2029-03-01T00:00:00Z') });
    const clock = new ManualClock('2026-12-02T10:00:00Z');
    expect(clock.now().toISOString()).toBe('2026-12-02T10:00:00.000Z');
    vi.advanceTimersByTime(90_000);
    expect(clock.now().toISOString()).toBe('2026-12-02T10:01:30.000Z');
  });

  it('moves when set or advanced, and stands still when frozen until resumed', () => {
    vi.useFakeTimers({ now: new Date('2027-01-01T00:00:00Z') });
    const clock = new ManualClock('2026-12-31T23:59:00Z');
    clock.advance(120_000);
    expect(clock.now().toISOString()).toBe('2027-01-01T00:01:00.000Z');
    clock.set('2028-02-29T12:00:00Z').freeze();
    vi.advanceTimersByTime(3_600_000);
    expect(clock.now().toISOString()).toBe('2028-02-29T12:00:00.000Z');
    clock.resume();
    vi.advanceTimersByTime(1_000);
    expect(clock.now().toISOString()).toBe('2028-02-29T12:00:01.000Z');
    expect(new ManualClock('2026-01-01T00:00:00Z', { frozen: true }).freeze('2026-06-01T00:00:00Z').now().toISOString()).toBe('2026-06-01T00:00:00.000Z');
  });

  it('refuses what is not a time', () => {
    expect(() => new ManualClock('yesterday')).toThrow(/not a time/);
    expect(() => new ManualClock('2026-01-01T00:00:00Z').set('soon')).toThrow(/not a time/);
  });
});
