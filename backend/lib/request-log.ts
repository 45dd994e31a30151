import type { IncomingMessage, ServerResponse } from 'node:http';
import { type DestinationStream, pino } from 'pino';
import { pinoHttp, type Options } from 'pino-http';
import type { Config } from '../config/env.ts';

/** What a request's line says at `info`: enough to find it, none of its headers. */
const brief = {
  req: (req: IncomingMessage & { id?: unknown; raw?: IncomingMessage }) => ({ id: req.id, method: req.method, url: req.url }),
  res: (res: ServerResponse) => ({ statusCode: res.statusCode }),
};

/**
 * One line per answered request (never for the load balancer's health probes). At `info` and above a line
 * names the request and its status; at `debug` and `trace` it carries the headers too, cookies and CSRF
 * tokens redacted. Lines go to standard output unless a `destination` is given: gathered and written a few
 * kilobytes at a time (and at least every second, and on exit), since a write per line cost the request
 * thread a sixth of its time under load.
 */
export function requestLogger(config: Pick<Config, 'LOG_LEVEL' | 'NODE_ENV'>, destination?: DestinationStream) {
  const level = config.LOG_LEVEL ?? (config.NODE_ENV === 'test' ? 'silent' : 'info');
  const options: Options = {
    level,
    autoLogging: { ignore: (req) => req.url === '/api/health' },
    redact: ['req.headers.cookie', 'req.headers["x-csrf-token"]', 'res.headers["set-cookie"]'],
  };
  if (level !== 'debug' && level !== 'trace') options.serializers = brief;
  return pinoHttp(options, destination ?? (level === 'silent' ? undefined : bufferedStdout()));
}

/** Standard output, written asynchronously in pieces of 4 KiB or more; flushed every second and on exit. */
function bufferedStdout() {
  const out = pino.destination({ dest: 1, sync: false, minLength: 4096 });
  setInterval(() => {
    // Throws only once the stream is destroyed, on the way out.
    try {
      out.flush();
    } catch {
      /* exiting */
    }
  }, 1000).unref();
  return out;
}
