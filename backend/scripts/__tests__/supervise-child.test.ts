import { describe, expect, it } from 'vitest';
import { superviseChild } from '../lib.mjs';

const until = async (what: string, ok: () => boolean, timeoutMs = 10_000) => {
  const end = Date.now() + timeoutMs;
  while (!ok()) {
    if (Date.now() > end) throw new Error(`${what}: not within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 20));
  }
};
const quick = { minDelayMs: 20, maxDelayMs: 80, stdio: 'ignore' as const };

describe('superviseChild (npm start keeps its children up)', () => {
  it('starts a child that exits on its own again, and again', async () => {
    const s = superviseChild('crasher', process.execPath, ['-e', 'process.exit(3)'], {}, quick);
    await until('three starts', () => s.starts >= 3);
    await s.stop();
    const after = s.starts;
    await new Promise((r) => setTimeout(r, 300));
    expect(s.starts).toBe(after);
  });

  it('starts a child killed by a signal again', async () => {
    const s = superviseChild('sleeper', process.execPath, ['-e', 'setInterval(() => {}, 1000)'], {}, quick);
    await until('running', () => s.child?.pid !== undefined);
    const first = s.child!.pid;
    s.child!.kill('SIGKILL');
    await until('a second start', () => s.starts === 2 && s.child?.pid !== undefined && s.child.pid !== first);
    await s.stop();
  });

  it('stop() ends the child for good and resolves once it has exited', async () => {
    const s = superviseChild('sleeper', process.execPath, ['-e', 'setInterval(() => {}, 1000)'], {}, quick);
    await until('running', () => s.child?.pid !== undefined);
    const child = s.child!;
    await s.stop();
    expect(child.exitCode !== null || child.signalCode !== null).toBe(true);
    await new Promise((r) => setTimeout(r, 200));
    expect(s.starts).toBe(1);
    expect(s.child).toBeNull();
  });
});
