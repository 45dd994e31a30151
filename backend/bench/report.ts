// One way for every benchmark to state a target of the speed issue and the figure it measured.
// `reportTarget()` prints the line and, when BENCH_REPORT names a file (`npm run bench` sets it),
// appends it there as one JSON line; `npm run bench` ends with a table of every line in that file.
import fs from 'node:fs';

export interface BenchTarget {
  /** What was measured, e.g. "API bookings list, requests/s vs bare node:http + pg". */
  name: string;
  /** The figure measured, in `unit`. */
  figure: number;
  unit: string;
  /** The target, in the same unit as `figure`. */
  target: number;
  /** Whether the figure meets the target. Use `atMost()` / `atLeast()` to say it the same way everywhere. */
  pass: boolean;
  /** Figure ÷ target, when a ratio says more than the figure alone (filled in when left out). */
  ratio?: number;
  /** A word on what holds a missed target back, or how the figure was taken. */
  note?: string;
}

/** A figure that must stay at or under its target (times, sizes). */
export const atMost = (figure: number, target: number) => figure <= target;
/** A figure that must reach its target (throughput, ratios). */
export const atLeast = (figure: number, target: number) => figure >= target;

export function formatTarget(t: BenchTarget): string {
  const ratio = t.ratio ?? (t.target === 0 ? undefined : t.figure / t.target);
  const round = (n: number) => (Number.isInteger(n) ? String(n) : Math.abs(n) >= 100 ? n.toFixed(0) : Math.abs(n) >= 10 ? n.toFixed(1) : n.toFixed(2));
  return `${t.pass ? 'PASS' : 'MISS'}  ${t.name}: ${round(t.figure)} ${t.unit} (target ${round(t.target)} ${t.unit}${ratio === undefined ? '' : `, ratio ${ratio.toFixed(2)}`})${t.note ? ` — ${t.note}` : ''}`;
}

/** Prints the target line and appends it to the file named by BENCH_REPORT, if any. */
export function reportTarget(t: BenchTarget): void {
  const line: BenchTarget = { ...t, ratio: t.ratio ?? (t.target === 0 ? undefined : t.figure / t.target) };
  console.log(`  ${formatTarget(line)}`);
  const file = process.env.BENCH_REPORT;
  if (file) fs.appendFileSync(file, `${JSON.stringify(line)}\n`);
}
