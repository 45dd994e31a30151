// CPU time spent by processes (Linux /proc): a figure that holds when other work shares the machine, where
// requests/s and latencies do not. Used to split a request's cost between the Node.js server and PostgreSQL.
import fs from 'node:fs';

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
