import { EventEmitter } from 'node:events';
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import { dispatchJobs, terminateSlots, type WorkerSlot } from './worker-pool.ts';

/**
 * PDF rendering off the event loop: a small, bounded pool of worker threads (see
 * pdf-render.worker.mjs). A job names a module and one of its exports that returns the PDF's bytes,
 * plus that export's arguments, which must survive structured cloning (plain objects, arrays,
 * strings, numbers, Dates — no functions). The export runs inside the thread, so a long report's
 * layout never holds up other requests on this app instance.
 *
 * Jobs beyond the pool's size wait in order. An error thrown in the thread rejects that job's
 * promise with an Error of the same message (a route lets it reach the problem handler: a 500
 * problem); a thread that dies takes only its own job with it and is replaced on the next job.
 * Idle threads do not keep the process alive.
 */

export interface PdfRenderJob {
  /** A file URL of the module, e.g. `new URL('./audit-report.ts', import.meta.url)`. */
  module: URL;
  /** The export called in the thread with `args`; it returns the PDF as a Buffer or Uint8Array. */
  exportName: string;
  args: unknown[];
}

interface Pending {
  id: number;
  job: PdfRenderJob;
  resolve(pdf: Buffer): void;
  reject(err: Error): void;
}

type Slot = WorkerSlot<Pending>;

export class PdfRenderError extends Error {
  constructor(
    message: string,
    readonly workerStack?: string,
  ) {
    super(message);
    this.name = 'PdfRenderError';
  }
}

const workerFile = new URL('./pdf-render.worker.mjs', import.meta.url);

/**
 * A render thread's young generation, where the layout's short-lived objects live. pdfmake allocates
 * for every word it measures and draws (style look-ups, text fragments), and with V8's default size a
 * long report spends a large part of its time in scavenges; a larger young generation collects less
 * often, for a few dozen MiB more of the thread's memory.
 */
export const renderThreadLimits = { maxYoungGenerationSizeMb: 96 } as const;

export class PdfRenderPool {
  /** 'start' ({ exportName }) when a job is handed to a thread; 'done' ({ exportName, ok }) when it settles. */
  readonly events = new EventEmitter();
  private readonly size: number;
  private readonly slots: Slot[] = [];
  private readonly queue: Pending[] = [];
  private nextId = 1;
  private closed = false;

  /**
   * At least two threads, so a long report laid out in parts (the sanitation audit) keeps two cores
   * busy while the database is idle; one for each core beyond the first on a larger machine, at most four.
   */
  constructor({ size }: { size?: number } = {}) {
    this.size = Math.max(1, size ?? Math.min(4, Math.max(2, os.availableParallelism() - 1)));
  }

  /** How many threads the pool runs at most: the number of parts worth laying out at once. */
  get threads(): number {
    return this.size;
  }

  /** Runs `job` on every thread of the pool at once, starting them all (a warm-up at start); the first result. */
  async warm(job: PdfRenderJob): Promise<Buffer> {
    const [first] = await Promise.all(Array.from({ length: this.size }, () => this.render(job)));
    return first!;
  }

  render(job: PdfRenderJob): Promise<Buffer> {
    if (this.closed) return Promise.reject(new PdfRenderError('The PDF render pool is closed.'));
    return new Promise<Buffer>((resolve, reject) => {
      this.queue.push({ id: this.nextId++, job, resolve, reject });
      this.pump();
    });
  }

  /** Stops every thread; waiting and running jobs are rejected. */
  async close(): Promise<void> {
    this.closed = true;
    for (const p of this.queue.splice(0)) p.reject(new PdfRenderError('The PDF render pool was closed.'));
    await terminateSlots(this.slots, () => new PdfRenderError('The PDF render pool was closed.'));
  }

  private pump() {
    dispatchJobs(
      { queue: this.queue, slots: this.slots, size: this.size, closed: this.closed },
      () => this.spawn(),
      (slot, pending) => {
        this.events.emit('start', { exportName: pending.job.exportName });
        slot.worker.postMessage({ id: pending.id, module: pending.job.module.href, exportName: pending.job.exportName, args: pending.job.args });
      },
    );
  }

  private spawn(): Slot {
    const worker = new Worker(workerFile, { resourceLimits: renderThreadLimits });
    const slot: Slot = { worker, busy: null };
    worker.unref();
    worker.on('message', (msg: { id: number; ok: true; pdf: Uint8Array } | { id: number; ok: false; error: { message: string; stack?: string } }) => {
      const pending = slot.busy;
      if (!pending || pending.id !== msg.id) return;
      slot.busy = null;
      worker.unref();
      if (msg.ok) pending.resolve(Buffer.from(msg.pdf.buffer, msg.pdf.byteOffset, msg.pdf.byteLength));
      else pending.reject(new PdfRenderError(msg.error.message, msg.error.stack));
      this.events.emit('done', { exportName: pending.job.exportName, ok: msg.ok });
      this.pump();
    });
    const lost = (err: Error) => {
      const i = this.slots.indexOf(slot);
      if (i >= 0) this.slots.splice(i, 1);
      const pending = slot.busy;
      slot.busy = null;
      if (pending) {
        pending.reject(err);
        this.events.emit('done', { exportName: pending.job.exportName, ok: false });
      }
      if (!this.closed) this.pump();
    };
    worker.on('error', (err) => lost(new PdfRenderError(`The PDF render thread failed: ${err.message}`, err.stack)));
    worker.on('exit', (code) => lost(new PdfRenderError(`The PDF render thread stopped (exit code ${code}).`)));
    this.slots.push(slot);
    return slot;
  }
}

/** The app instance's pool, shared by every report rendered off the event loop. */
export const pdfRenderPool = new PdfRenderPool();

export function renderPdfOffThread(job: PdfRenderJob): Promise<Buffer> {
  return pdfRenderPool.render(job);
}
