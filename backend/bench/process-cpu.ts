// CPU time spent by processes (Linux /proc): a figure that holds when other work shares the machine, where
// requests/s and latencies do not. Used to split a request's cost between the Node.js server and PostgreSQL.
import fs from 'node:fs';
import { availableParallelism } from 'node:os';

const TICK_MS = 1000 / 100; // USER_HZ is 100 on Linux

/**
 * The fields of /proc/<pid>/stat after the command name (state is [0], ppid [1], utime [11], stime [12], and the
 * CPU of its children that have ended, cutime [13] and cstime [14]).
 */
function statOf(pid: number): string[] | null {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
    return stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  } catch {
    return null;
  }
}

/** The parent of `pid`. */
export function parentOf(pid: number): number {
  const f = statOf(pid);
  if (!f) throw new Error(`no process ${pid}`);
  return Number(f[1]);
}

/** `pid` and its descendants. */
export function processTree(pid: number): number[] {
  const parents = new Map<number, number>();
  for (const d of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(d)) continue;
    const f = statOf(Number(d));
    if (f) parents.set(Number(d), Number(f[1]));
  }
  const tree = [pid];
  for (let i = 0; i < tree.length; i += 1) for (const [child, parent] of parents) if (parent === tree[i]) tree.push(child);
  return tree;
}

/**
 * User + system CPU milliseconds of the processes now in `pid`'s tree, and of those of its processes that have
 * ended (PostgreSQL's backends and autovacuum workers come and go).
 */
export function cpuMsOfTree(pid: number): number {
  return processTree(pid).reduce((sum, p) => {
    const f = statOf(p);
    return f ? sum + (Number(f[11]) + Number(f[12]) + Number(f[13]) + Number(f[14])) * TICK_MS : sum;
  }, 0);
}

/** CPU milliseconds each tree spent while `work` ran, keyed as given. */
export async function cpuDuring<T>(trees: Record<string, number>, work: () => Promise<T>): Promise<{ value: T; cpuMs: Record<string, number> }> {
  const before = Object.fromEntries(Object.entries(trees).map(([k, pid]) => [k, cpuMsOfTree(pid)]));
  const value = await work();
  const cpuMs = Object.fromEntries(Object.entries(trees).map(([k, pid]) => [k, cpuMsOfTree(pid) - before[k]!]));
  return { value, cpuMs };
}

/** The machine's CPU counters from /proc/stat (all cores, in USER_HZ ticks): busy, idle and stolen by the host. */
function machineTicks() {
  const [, ...fields] = fs.readFileSync('/proc/stat', 'utf8').split('\n')[0]!.trim().split(/\s+/);
  const [user, nice, system, idle, iowait, irq, softirq, steal] = fields.map(Number) as [number, number, number, number, number, number, number, number];
  return { busy: user + nice + system + irq + softirq, idle: idle + iowait, steal };
}

/**
 * How busy the whole machine was while `work` ran, in cores (of `cores`): every process (the servers,
 * PostgreSQL, the load generator), and the time the host took for other guests (steal).
 */
export async function machineDuring<T>(cores: number, work: () => Promise<T>): Promise<{ value: T; busyCores: number; stolenCores: number }> {
  const before = machineTicks();
  const value = await work();
  const after = machineTicks();
  const busy = after.busy - before.busy;
  const steal = after.steal - before.steal;
  const total = busy + steal + (after.idle - before.idle);
  return { value, busyCores: total > 0 ? (busy / total) * cores : 0, stolenCores: total > 0 ? (steal / total) * cores : 0 };
}

/**
 * Waits until the machine is quiet (under `below` cores busy over a second) or `maxMs` has passed, and says
 * how long it took: a production server lays out made-up audits on its PDF render threads at start
 * (PDF_WARM_UP_ROUNDS), seconds of both cores that a throughput run started at once would share.
 */
export async function waitForQuiet(label: string, { below = 0.3, maxMs = 120_000 } = {}): Promise<void> {
  const t0 = performance.now();
  for (;;) {
    const { busyCores } = await machineDuring(1, () => new Promise((r) => setTimeout(r, 1000)));
    const waited = performance.now() - t0;
    if (busyCores * availableParallelism() < below || waited > maxMs) {
      console.log(`  ${label}: machine quiet after ${(waited / 1000).toFixed(0)} s (${(busyCores * availableParallelism()).toFixed(2)} cores busy)`);
      return;
    }
  }
}
