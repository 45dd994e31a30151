import { Writable } from 'node:stream';
import express from 'express';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { requestLogger } from '../request-log.ts';

/** An app that logs through requestLogger at `level` into an array of parsed lines. */
function appLoggingAt(level: 'info' | 'debug') {
  const lines: Record<string, unknown>[] = [];
  const sink = new Writable({
    write(chunk: Buffer, _enc, done) {
      for (const l of String(chunk).split('\n').filter(Boolean)) lines.push(JSON.parse(l) as Record<string, unknown>);
      done();
    },
  });
  const app = express();
  app.use(requestLogger({ LOG_LEVEL: level, NODE_ENV: 'production' }, sink));
  app.get('/api/health', (_req, res) => res.json({ ok: true }));
  app.get('/api/things', (_req, res) => res.json({ items: [] }));
  return { app, lines };
}

describe('request log lines', () => {
  it('name the request and its status at info, without headers, cookies or tokens', async () => {
    const { app, lines } = appLoggingAt('info');
    await request(app).get('/api/things?page=2').set('Cookie', 'cw.sid=secret-session').set('X-CSRF-Token', 'secret-token').expect(200);
    expect(lines).toHaveLength(1);
    const line = lines[0]!;
    expect(line.req).toEqual({ id: expect.anything(), method: 'GET', url: '/api/things?page=2' });
    expect(line.res).toEqual({ statusCode: 200 });
    expect(typeof line.responseTime).toBe('number');
    expect(JSON.stringify(line)).not.toMatch(/secret|headers/);
  });

  it('carry the headers at debug, with the cookie and CSRF token redacted', async () => {
    const { app, lines } = appLoggingAt('debug');
    await request(app).get('/api/things').set('Cookie', 'cw.sid=secret-session').set('X-CSRF-Token', 'secret-token').expect(200);
    const req = lines[0]!.req as { headers: Record<string, string> };
    expect(req.headers.cookie).toBe('[Redacted]');
    expect(req.headers['x-csrf-token']).toBe('[Redacted]');
    expect(JSON.stringify(lines[0])).not.toMatch(/secret/);
  });

  it('leave out the load balancer’s health probes', async () => {
    const { app, lines } = appLoggingAt('info');
    await request(app).get('/api/health').expect(200);
    expect(lines).toHaveLength(0);
  });
});
