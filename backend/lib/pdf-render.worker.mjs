// A PDF render thread of backend/lib/pdf-render.ts. Plain JavaScript so that it starts the same
// under tsx (the server, benchmarks), under vitest (whose transforms do not reach threads) and from
// the built server in dist/server: from the sources it registers tsx's loader itself, then imports
// the module a job names and calls the
// export the job names with the job's plain (structured-clone) arguments. Such an export builds
// the document definition from that data here, header and footer callbacks included, so nothing
// that is a function ever crosses the thread boundary.
import fs from 'node:fs';
import { parentPort } from 'node:worker_threads';

// From the sources (pdf-render.ts beside this file) the modules jobs name are TypeScript, read through
// tsx's loader; the built server has them as JavaScript and needs no loader.
if (fs.existsSync(new URL('./pdf-render.ts', import.meta.url))) (await import('tsx/esm/api')).register();

if (!parentPort) throw new Error('pdf-render.worker.mjs runs only as a worker thread');
const port = parentPort;

port.on('message', async (job) => {
  try {
    const mod = await import(job.module);
    const render = mod[job.exportName];
    if (typeof render !== 'function') throw new Error(`${job.module} has no export ${job.exportName}`);
    const out = await render(...job.args);
    if (!(out instanceof Uint8Array)) throw new Error(`${job.exportName} did not return the PDF's bytes`);
    // A copy of exactly the PDF's bytes in a buffer of its own, handed over without another copy.
    const bytes = new Uint8Array(out.byteLength);
    bytes.set(out);
    port.postMessage({ id: job.id, ok: true, pdf: bytes }, [bytes.buffer]);
  } catch (err) {
    const e = err instanceof Error ? err : new Error(String(err));
    port.postMessage({ id: job.id, ok: false, error: { name: e.name, message: e.message, stack: e.stack } });
  }
});
