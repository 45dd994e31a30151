// An import thread of backend/modules/batches/import-pool.ts. Plain JavaScript so that it starts the
// same under tsx (the server, benchmarks) and under vitest (whose transforms do not reach threads):
// it registers tsx's loader itself, then reads and checks each file it is handed with
// prepareImport() from import-check.ts. A refusal goes back as the problem's fields; anything else
// that goes wrong while reading a file is reported as an unreadable file, never in a library's words.
import { parentPort } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();

if (!parentPort) throw new Error('import.worker.mjs runs only as a worker thread');
const port = parentPort;

// Loading starts at once, so a warmed thread has its modules ready for the first file.
const modules = Promise.all([
  import(new URL('./import-check.ts', import.meta.url).href),
  import(new URL('./import-file.ts', import.meta.url).href),
  import(new URL('../../lib/http-problem.ts', import.meta.url).href),
]);
modules.then(() => port.postMessage({ ready: true }));

port.on('message', async (job) => {
  const [{ prepareImport }, { unreadableFile }, { HttpProblem }] = await modules;
  try {
    const result = await prepareImport(job.input, (phase, done, total) => port.postMessage({ id: job.id, progress: { phase, done, total } }));
    const r = result.readings;
    const transfer = [r.time, r.value, r.temperatureC, r.correctTemperature, r.sg, r.rawSg, r.corrected].map((a) => a.buffer);
    port.postMessage({ id: job.id, ok: true, result }, transfer);
  } catch (err) {
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
});
