import type { AddressInfo } from 'node:net';
import express from 'express';
import session from 'express-session';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { problemHandler } from '../problem-handler.ts';
import { reportLateSessionErrors } from '../session-errors.ts';

const refused = () => Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5432'), { code: 'ECONNREFUSED' });

/** A session store whose reads or writes fail as they do while the database is down. */
class FlakyStore extends session.MemoryStore {
  failGet = false;
  failWrite = false;
  override get(sid: string, cb: (err: unknown, s?: session.SessionData | null) => void) {
    if (this.failGet) return setImmediate(() => cb(refused()));
    super.get(sid, cb);
  }
  override set(sid: string, s: session.SessionData, cb?: (err?: unknown) => void) {
    if (this.failWrite) return setImmediate(() => cb?.(refused()));
    super.set(sid, s, cb);
  }
  override touch(sid: string, s: session.SessionData, cb?: (err?: unknown) => void) {
    if (this.failWrite) return setImmediate(() => cb?.(refused()));
    super.touch(sid, s, cb);
  }
}

function appWith(store: FlakyStore) {
  const app = express();
  app.use(reportLateSessionErrors(session({ secret: 'x'.repeat(32), store, resave: false, saveUninitialized: false, rolling: true })));
  app.post('/sign-in', (req, res) => {
    (req.session as unknown as { who: string }).who = 'member';
    res.json({ ok: true });
  });
  app.post('/write', (_req, res) => {
    res.json({ items: Array.from({ length: 50 }, (_, i) => ({ i, text: 'a longer answer' })) });
  });
  app.post('/fails', () => {
    throw refused();
  });
  app.use(problemHandler);
  return app;
}

describe('session store failures', () => {
  it('a session that cannot be read answers 503 problem JSON', async () => {
    const store = new FlakyStore();
    const agent = request.agent(appWith(store));
    expect((await agent.post('/sign-in')).status).toBe(200);
    store.failGet = true;
    const res = await agent.post('/write');
    expect(res.status).toBe(503);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body.title).toBe('Service unavailable');
  });

  it('an answer whose session cannot be saved afterwards still arrives whole, and the connection stays usable', async () => {
    const store = new FlakyStore();
    const server = appWith(store).listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    try {
      const signIn = await fetch(`${base}/sign-in`, { method: 'POST' });
      expect(signIn.status).toBe(200);
      const cookie = signIn.headers
        .getSetCookie()
        .map((c) => c.split(';')[0])
        .join('; ');
      await signIn.text();
      store.failWrite = true;
      // One kept-alive connection carries these in turn: a connection cut after an answer would make the
      // client open another (or, in a race with its next request, fail that request).
      let connections = 0;
      server.on('connection', () => connections++);
      for (let i = 0; i < 5; i++) {
        const ok = await fetch(`${base}/write`, { method: 'POST', headers: { cookie } });
        expect(ok.status).toBe(200);
        expect(((await ok.json()) as { items: unknown[] }).items).toHaveLength(50);
        // A 503 written by the problem handler, whose session touch then fails too.
        const down = await fetch(`${base}/fails`, { method: 'POST', headers: { cookie } });
        expect(down.status).toBe(503);
        expect(((await down.json()) as { detail: string }).detail).toBe('The database is unreachable; try again shortly.');
        await new Promise((r) => setTimeout(r, 20));
      }
      expect(connections).toBeLessThanOrEqual(1);
    } finally {
      server.closeAllConnections();
      await new Promise((r) => server.close(r));
    }
  });
});
