// An import thread of backend/modules/batches/import-pool.ts. Plain JavaScript so that it starts the
// same from the sources (the server under tsx, benchmarks, vitest, whose transforms do not reach
// threads: it registers tsx's loader itself) and from the built server in dist/server (the modules
// beside it are JavaScript there, no loader needed), then reads and checks each file it is handed with
// prepareImport() from import-check.ts. A refusal goes back as the problem's fields; anything else
// that goes wrong while reading a file is reported as an unreadable file, never in a library's words
// (`internal` carries the error for the server's log).
import fs from 'node:fs';
import { parentPort } from 'node:worker_threads';

const fromSources = fs.existsSync(new URL('./import-check.ts', import.meta.url));
if (fromSources) (await import('tsx/esm/api')).register();
const ext = fromSources ? '.ts' : '.js';

if (!parentPort) throw new Error('import.worker.mjs runs only as a worker thread');
const port = parentPort;

// Loading starts at once, so a warmed thread has its modules ready for the first file.
const modules = Promise.all([
  import(new URL(`./import-check${ext}`, import.meta.url).href),
  import(new URL(`./import-file${ext}`, import.meta.url).href),
  import(new URL(`../../lib/http-problem${ext}`, import.meta.url).href),
]);
modules.then(() => port.postMessage({ ready: true }));

/** The file being read (one at a time per thread). */
let current = null;

async function fail(job, err) {
  if (current !== job) return;
  current = null;
  const loaded = await modules.catch(() => null);
  if (!loaded) {
    port.postMessage({
      id: job.id,
      ok: false,
      problem: { status: 500, title: 'Internal server error', detail: 'Something went wrong on our side.', type: 'about:blank', extra: {} },
      internal: 'the import modules failed to load',
    });
    return;
  }
  const [, { unreadableFile }, { HttpProblem }] = loaded;
  const bytes = job.input.file.bytes;
  const isZip = bytes.length >= 2 && bytes[0] === 0x50 && bytes[1] === 0x4b;
  const p = err instanceof HttpProblem ? err : unreadableFile(isZip ? 'XLSX' : 'CSV');
  port.postMessage({
    id: job.id,
    ok: false,
    problem: { status: p.status, title: p.title, detail: p.detail, errors: p.errors, type: p.type, extra: p.extra },
    internal: err instanceof HttpProblem ? undefined : String(err instanceof Error ? err.stack : err),
  });
}

// The spreadsheet reader can raise an error from a stream of a workbook it was still reading when
// that read was abandoned (a damaged or refused file, already answered). Such a stray error belongs
// to no file being read now, so it neither fails the next file nor ends the thread; a file whose
// own read never ends is stopped by the pool's time limit.
process.on('uncaughtException', () => undefined);
process.on('unhandledRejection', () => undefined);

port.on('message', async (job) => {
  current = job;
  try {
    const [{ prepareImport }] = await modules;
    const result = await prepareImport(job.input, (phase, done, total) => port.postMessage({ id: job.id, progress: { phase, done, total } }));
    if (current !== job) return;
    current = null;
    const r = result.readings;
    const transfer = [r.time, r.value, r.temperatureC, r.correctTemperature, r.sg, r.rawSg, r.corrected, r.method].map((a) => a.buffer);
    port.postMessage({ id: job.id, ok: true, result }, transfer);
  } catch (err) {
    await fail(job, err);
  }
});
