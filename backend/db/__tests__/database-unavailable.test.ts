import net from 'node:net';
import express from 'express';
import pg from 'pg';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { HttpProblem } from '../../lib/http-problem.ts';
import { queueErrorReporter } from '../../lib/queue.ts';
import { problemHandler } from '../../middleware/problem-handler.ts';
import { guardPool, isDatabaseUnavailable } from '../database.ts';

/** An error as pg reports one from the server: a message and a SQLSTATE. */
const pgError = (code: string, message = 'server error') => Object.assign(new Error(message), { code, severity: 'FATAL' });
const sysError = (code: string) => Object.assign(new Error(`connect ${code} 127.0.0.1:5432`), { code, syscall: 'connect' });

describe('isDatabaseUnavailable', () => {
  it.each([
    ['a refused connection', sysError('ECONNREFUSED')],
    ['a reset connection', sysError('ECONNRESET')],
    ['a broken pipe', sysError('EPIPE')],
    ['a timed-out socket', sysError('ETIMEDOUT')],
    ['an unreachable host', sysError('EHOSTUNREACH')],
    ['an administrator shutdown (57P01)', pgError('57P01', 'terminating connection due to administrator command')],
    ['a crash shutdown (57P02)', pgError('57P02')],
    ['a server still starting or stopping (57P03)', pgError('57P03', 'the database system is shutting down')],
    ['too many connections (53300)', pgError('53300')],
    ['a connection exception (08006)', pgError('08006')],
    ['a connection that could not be made (08001)', pgError('08001')],
    ['a protocol violation (08P01)', pgError('08P01')],
    ['an unexpected end of connection', new Error('Connection terminated unexpectedly')],
    ['a client connection timeout', new Error('Connection terminated due to connection timeout')],
    ['a pool connect timeout', new Error('timeout exceeded when trying to connect')],
    ['a client that lost its connection', new Error('Client has encountered a connection error and is not queryable')],
    ['every address refused (AggregateError)', new AggregateError([sysError('ECONNREFUSED'), sysError('ECONNREFUSED')], 'connect failed')],
    ['a wrapped cause', new Error('query failed', { cause: pgError('57P01') })],
  ])('true for %s', (_what, err) => {
    expect(isDatabaseUnavailable(err)).toBe(true);
  });

  it.each([
    ['a unique violation (23505)', pgError('23505', 'duplicate key value')],
    ['an exclusion violation (23P01)', pgError('23P01')],
    ['a serialization failure (40001)', pgError('40001')],
    ['a syntax error (42601)', pgError('42601')],
    ['a statement timeout (57014)', pgError('57014', 'canceling statement due to statement timeout')],
    ['an invalid input (22P02)', pgError('22P02')],
    ['a programming error', new TypeError("Cannot read properties of undefined (reading 'id')")],
    [
      'a client that hung up mid-body (an HTTP error)',
      Object.assign(new Error('request aborted'), { code: 'ECONNABORTED', status: 400, type: 'request.aborted' }),
    ],
    ['an HTTP error with a socket code', Object.assign(new Error('reset'), { code: 'ECONNRESET', statusCode: 400 })],
    ['an HttpProblem', new HttpProblem(409, 'Conflict', 'taken')],
    ['an AggregateError of mixed causes', new AggregateError([sysError('ECONNREFUSED'), new Error('bad')])],
    ['nothing', undefined],
    ['a string', 'ECONNREFUSED'],
  ])('false for %s', (_what, err) => {
    expect(isDatabaseUnavailable(err)).toBe(false);
  });
});

describe('real connection failures', () => {
  let silent: net.Server;
  let silentPort = 0;
  const sockets: net.Socket[] = [];
  beforeAll(async () => {
    // Accepts connections and never answers: a database that hangs.
    silent = net.createServer((s) => sockets.push(s));
    await new Promise<void>((r) => silent.listen(0, '127.0.0.1', () => r()));
    silentPort = (silent.address() as net.AddressInfo).port;
  });
  afterAll(async () => {
    for (const s of sockets) s.destroy();
    await new Promise((r) => silent.close(r));
  });

  async function closedPort(): Promise<number> {
    const srv = net.createServer();
    await new Promise<void>((r) => srv.listen(0, '127.0.0.1', () => r()));
    const { port } = srv.address() as net.AddressInfo;
    await new Promise((r) => srv.close(r));
    return port;
  }

  it('a refused connection is classified as unavailable', async () => {
    const pool = guardPool(new pg.Pool({ connectionString: `postgres://x@127.0.0.1:${await closedPort()}/x`, connectionTimeoutMillis: 1000 }));
    const err = await pool.query('select 1').catch((e: unknown) => e);
    await pool.end();
    expect(isDatabaseUnavailable(err)).toBe(true);
  });

  it('a connection that times out is classified as unavailable, and does not hang', async () => {
    const pool = guardPool(new pg.Pool({ connectionString: `postgres://x@127.0.0.1:${silentPort}/x`, connectionTimeoutMillis: 200 }));
    const err = await pool.query('select 1').catch((e: unknown) => e);
    await pool.end();
    expect(err).toBeInstanceOf(Error);
    expect(isDatabaseUnavailable(err)).toBe(true);
  });
});

describe('problem handler', () => {
  const app = express();
  const errors: Record<string, unknown> = {
    down: pgError('57P01', 'terminating connection due to administrator command'),
    refused: sysError('ECONNREFUSED'),
    unique: pgError('23505', 'duplicate key value violates unique constraint'),
    bug: new TypeError('x is not a function'),
    zod: (() => {
      try {
        z.object({ a: z.string() }).parse({});
      } catch (e) {
        return e;
      }
    })(),
  };
  app.get('/:what', (req) => {
    throw errors[req.params.what];
  });
  app.use(problemHandler);

  it.each(['down', 'refused'])('answers 503 problem JSON with Retry-After when the database is unreachable (%s)', async (what) => {
    const res = await request(app).get(`/${what}`);
    expect(res.status).toBe(503);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
    expect(res.body).toEqual({ type: 'about:blank', status: 503, title: 'Service unavailable', detail: 'The database is unreachable; try again shortly.' });
  });

  it('leaves other errors as they were', async () => {
    expect((await request(app).get('/unique')).status).toBe(500);
    expect((await request(app).get('/bug')).status).toBe(500);
    expect((await request(app).get('/zod')).status).toBe(422);
    expect((await request(app).get('/bug')).headers['retry-after']).toBeUndefined();
  });
});

describe('queueErrorReporter', () => {
  it('writes other errors every time and an outage once per quiet period, with a count', () => {
    const lines: string[] = [];
    let t = 0;
    const report = queueErrorReporter(
      (m) => lines.push(m),
      30_000,
      () => t,
    );
    report(new Error('job handler bug'));
    report(pgError('57P01', 'terminating connection due to administrator command'));
    t = 1000;
    report(sysError('ECONNREFUSED'));
    report(sysError('ECONNREFUSED'));
    report(new Error('job handler bug'));
    t = 31_000;
    report(sysError('ECONNREFUSED'));
    expect(lines).toHaveLength(4);
    expect(lines[0]).toMatch(/job handler bug/);
    expect(lines[1]).toMatch(/database unavailable.*administrator command/);
    expect(lines[2]).toMatch(/job handler bug/);
    expect(lines[3]).toMatch(/ECONNREFUSED.*\(\+2 more like it\)/);
  });
});
