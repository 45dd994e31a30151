import type { Worker } from 'node:worker_threads';

/** One thread of a bounded pool and the job it is running (null: idle). */
export interface WorkerSlot<J> {
  worker: Worker;
  busy: J | null;
}

/**
 * Hands the waiting jobs, in order, to idle threads of a bounded pool (the PDF render pool, the
 * import pool): an idle thread takes the next job, a new one is started while the pool has fewer
 * than `size`, and the rest wait. A thread with a job keeps the process alive (`ref`); the pool
 * `unref`s it again when the job settles. `start` sends the job to its thread.
 */
export function dispatchJobs<J, S extends WorkerSlot<J>>(
  pool: { queue: J[]; slots: S[]; size: number; closed: boolean },
  spawn: () => S,
  start: (slot: S, job: J) => void,
): void {
  while (pool.queue.length && !pool.closed) {
    let slot = pool.slots.find((s) => !s.busy);
    if (!slot) {
      if (pool.slots.length >= pool.size) return;
      slot = spawn();
    }
    const job = pool.queue.shift()!;
    slot.busy = job;
    slot.worker.ref();
    start(slot, job);
  }
}

/** Stops every thread of a pool; the job each was running is rejected with `refusal()`. `each` runs first for every thread. */
export async function terminateSlots<J extends { reject(err: Error): void }, S extends WorkerSlot<J>>(
  slots: S[],
  refusal: () => Error,
  each?: (slot: S) => void,
): Promise<void> {
  await Promise.all(
    slots.splice(0).map((s) => {
      each?.(s);
      s.busy?.reject(refusal());
      s.busy = null;
      return s.worker.terminate();
    }),
  );
}
