import { EventEmitter } from 'node:events';
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import { HttpProblem } from '../../lib/http-problem.ts';
import { dispatchJobs, terminateSlots, type WorkerSlot } from '../../lib/worker-pool.ts';
import type { PrepareInput, PrepareProgress, PrepareResult } from './import-check.ts';

/**
 * Uploaded files are read and checked off the event loop, on a small pool of import threads
 * (import.worker.mjs runs prepareImport() from import-check.ts), so that a large or hostile file
 * never holds up the instance's other requests. Each thread runs under limits of its own:
 *
 * - time: a file still being read after `timeLimitMs` is refused (413) and its thread terminated;
 *   a fresh thread takes the next file;
 * - memory: the thread's heap is capped (`resourceLimits`); a file that needs more is refused (413)
 *   and only that thread dies;
 * - waiting: at most `maxWaiting` files wait for a thread; beyond that an import is a 503 to retry.
 *
 * The limits on the file itself (bytes, rows, columns, cells, workbook entries and unpacked size)
 * are checked inside the thread as it reads (import-file.ts, import-zip.ts). Idle threads do not
 * keep the process alive.
 */

/** Longest time one file may take to read and check on its thread. */
export const IMPORT_TIME_LIMIT_MS = 30_000;
/** Heap of one import thread, in MiB. */
export const IMPORT_MEMORY_LIMIT_MB = 384;
/** Most files waiting for a thread. */
export const IMPORT_MAX_WAITING = 8;

interface Pending {
  id: number;
  input: PrepareInput;
  onProgress?: PrepareProgress;
  resolve(r: PrepareResult): void;
  reject(err: Error): void;
}

interface Slot extends WorkerSlot<Pending> {
  timer: NodeJS.Timeout | null;
}

type WorkerMessage =
  | { ready: true }
  | { id: number; progress: { phase: 'reading' | 'checking'; done: number; total: number | null } }
  | { id: number; ok: true; result: PrepareResult }
  | {
      id: number;
      ok: false;
      problem: { status: number; title: string; detail?: string; errors?: HttpProblem['errors']; type: string; extra: Record<string, unknown> };
      internal?: string;
    };

const workerFile = new URL('./import.worker.mjs', import.meta.url);

export class ImportPool {
  /** 'start' when a file is handed to a thread; 'done' ({ ok }) when it is settled. */
  readonly events = new EventEmitter();
  timeLimitMs: number;
  memoryLimitMb: number;
  maxWaiting: number;
  private readonly size: number;
  private readonly slots: Slot[] = [];
  private readonly queue: Pending[] = [];
  private nextId = 1;
  private closed = false;

  constructor({
    size,
    timeLimitMs = IMPORT_TIME_LIMIT_MS,
    memoryLimitMb = IMPORT_MEMORY_LIMIT_MB,
    maxWaiting = IMPORT_MAX_WAITING,
  }: { size?: number; timeLimitMs?: number; memoryLimitMb?: number; maxWaiting?: number } = {}) {
    this.size = Math.max(1, size ?? Math.min(2, Math.max(1, os.availableParallelism() - 1)));
    this.timeLimitMs = timeLimitMs;
    this.memoryLimitMb = memoryLimitMb;
    this.maxWaiting = maxWaiting;
  }

  /** Reads and checks one file on a thread. The file's bytes are copied; the caller's buffer stays usable. */
  run(input: PrepareInput, onProgress?: PrepareProgress): Promise<PrepareResult> {
    if (this.closed) return Promise.reject(new HttpProblem(503, 'Service unavailable', 'The server is shutting down; try the import again in a moment.'));
    const free = this.slots.filter((s) => !s.busy).length + (this.size - this.slots.length);
    if (this.queue.length >= this.maxWaiting + free) {
      const n = this.queue.length;
      return Promise.reject(new HttpProblem(503, 'Busy', `${n} import${n === 1 ? ' is' : 's are'} waiting to be read; try again in a minute.`));
    }
    return new Promise<PrepareResult>((resolve, reject) => {
      this.queue.push({ id: this.nextId++, input, onProgress, resolve, reject });
      this.pump();
    });
  }

  /** Starts a thread ahead of the first file, so that it does not pay the start-up. */
  warm(): void {
    if (!this.closed && this.slots.length === 0) this.spawn();
  }

  /** Stops every thread; waiting and running files are refused. */
  async close(): Promise<void> {
    this.closed = true;
    const gone = () => new HttpProblem(503, 'Service unavailable', 'The server is shutting down; try the import again in a moment.');
    for (const p of this.queue.splice(0)) p.reject(gone());
    await terminateSlots(this.slots, gone, (s) => {
      if (s.timer) clearTimeout(s.timer);
    });
  }

  private pump() {
    dispatchJobs(
      { queue: this.queue, slots: this.slots, size: this.size, closed: this.closed },
      () => this.spawn(),
      (slot, pending) => {
        slot.timer = setTimeout(() => this.timeOut(slot), this.timeLimitMs);
        this.events.emit('start');
        // The bytes go over in a buffer of their own, handed over without another copy.
        const bytes = new Uint8Array(pending.input.file.bytes.byteLength);
        bytes.set(pending.input.file.bytes);
        slot.worker.postMessage({ id: pending.id, input: { ...pending.input, file: { ...pending.input.file, bytes } } }, [bytes.buffer]);
      },
    );
  }

  private settle(slot: Slot, ok = false): Pending | null {
    const pending = slot.busy;
    slot.busy = null;
    if (slot.timer) clearTimeout(slot.timer);
    slot.timer = null;
    if (pending) this.events.emit('done', { ok });
    return pending;
  }

  /** A thread lost to a file is replaced at once, so that the next file does not wait for its start-up. */
  private remove(slot: Slot, replace: boolean) {
    const i = this.slots.indexOf(slot);
    if (i < 0) return;
    this.slots.splice(i, 1);
    if (replace && !this.closed && this.slots.length === 0) this.spawn();
  }

  private timeOut(slot: Slot) {
    const pending = this.settle(slot);
    this.remove(slot, true);
    void slot.worker.terminate();
    pending?.reject(
      new HttpProblem(
        413,
        'File takes too long to read',
        `Reading the file took longer than ${Math.round(this.timeLimitMs / 100) / 10} seconds, the most one import may take; split it into smaller files.`,
      ),
    );
    this.pump();
  }

  private spawn(): Slot {
    const worker = new Worker(workerFile, {
      resourceLimits: { maxOldGenerationSizeMb: this.memoryLimitMb, maxYoungGenerationSizeMb: Math.min(64, Math.max(8, Math.round(this.memoryLimitMb / 8))) },
    });
    const slot: Slot = { worker, busy: null, timer: null };
    worker.unref();
    worker.on('message', (msg: WorkerMessage) => {
      if ('ready' in msg) return;
      const pending = slot.busy;
      if (!pending || pending.id !== msg.id) return;
      if ('progress' in msg) {
        void Promise.resolve(pending.onProgress?.(msg.progress.phase, msg.progress.done, msg.progress.total)).catch(() => undefined);
        return;
      }
      this.settle(slot, msg.ok);
      worker.unref();
      if (msg.ok) pending.resolve(msg.result);
      else {
        const p = msg.problem;
        if (msg.internal && process.env.NODE_ENV !== 'test') console.warn('import thread could not read a file:', msg.internal);
        pending.reject(new HttpProblem(p.status, p.title, p.detail, p.errors, p.type, p.extra));
      }
      this.pump();
    });
    const lost = (err: Error) => {
      const pending = this.settle(slot);
      this.remove(slot, pending !== null);
      pending?.reject(err);
      if (!this.closed) this.pump();
    };
    worker.on('error', (err: Error & { code?: string }) =>
      lost(
        err.code === 'ERR_WORKER_OUT_OF_MEMORY'
          ? new HttpProblem(
              413,
              'File needs too much memory',
              `Reading the file needed more than ${this.memoryLimitMb} MiB of memory, the most one import may use; split it into smaller files.`,
            )
          : new HttpProblem(422, 'Unreadable file', 'The file could not be read; export it again as CSV or .xlsx and upload it again.'),
      ),
    );
    worker.on('exit', () => lost(new HttpProblem(422, 'Unreadable file', 'The file could not be read; export it again as CSV or .xlsx and upload it again.')));
    this.slots.push(slot);
    return slot;
  }
}

/** The app instance's pool, shared by every import. */
export const importPool = new ImportPool();
