import type { IncomingMessage, ServerResponse } from 'node:http';
import type { DestinationStream } from 'pino';
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
 * tokens redacted. Lines go to standard output unless a `destination` is given.
 */
export function requestLogger(config: Pick<Config, 'LOG_LEVEL' | 'NODE_ENV'>, destination?: DestinationStream) {
  const level = config.LOG_LEVEL ?? (config.NODE_ENV === 'test' ? 'silent' : 'info');
  const options: Options = {
    level,
    autoLogging: { ignore: (req) => req.url === '/api/health' },
    redact: ['req.headers.cookie', 'req.headers["x-csrf-token"]', 'res.headers["set-cookie"]'],
  };
  if (level !== 'debug' && level !== 'trace') options.serializers = brief;
  return pinoHttp(options, destination);
}
