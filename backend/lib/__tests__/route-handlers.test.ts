import { randomUUID } from 'node:crypto';
import express, { type Router } from 'express';
import request from 'supertest';
import { describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { defineAbilityFor } from '../../../shared/permissions/ability.ts';
import type { Role } from '../../../shared/permissions/roles.ts';
import { problemHandler } from '../../middleware/problem-handler.ts';
import type { SessionUser } from '../../modules/auth/auth.service.ts';
import { createHandler, listHandler, signedInRouter } from '../route-handlers.ts';

const listQuery = z.object({ page: z.coerce.number().int().min(1).default(1) });
const newThing = z.object({ name: z.string().min(1) });

/** An app with `router` mounted at /things for a person with `roles` (nobody when null), problems as JSON. */
function appFor(router: Router, roles: Role[] | null) {
  const user: SessionUser | null = roles && { id: randomUUID(), email: 'someone@example.org', name: 'Someone', roles, units: 'metric' };
  const app = express();
  app.use(express.json());
  app.use((req, _res, next) => {
    req.user = user;
    req.ability = defineAbilityFor(user);
    next();
  });
  app.use('/things', router);
  app.use(problemHandler);
  return { app, user };
}

/** A router serving a list of kegs and the creation of transfers through the helpers, with spies for what they call. */
function thingsRouter() {
  const load = vi.fn((q: { page: number }, scope: { restrictTo: string | undefined }) =>
    Promise.resolve({ items: [], page: q.page, restrictTo: scope.restrictTo ?? null }),
  );
  const create = vi.fn((input: { name: string }, actor: { id: string }) => Promise.resolve({ created: input.name, by: actor.id }));
  const router = signedInRouter({ id: 'Thing' });
  router.get('/', listHandler(listQuery, 'Keg', load));
  router.post('/', createHandler(newThing, 'Transfer', create));
  router.get('/:id', (req, res) => {
    res.json({ id: req.params.id });
  });
  return { router, load, create };
}

describe('signedInRouter', () => {
  it('answers 401 to nobody signed in, before any handler runs', async () => {
    const { router, load } = thingsRouter();
    const res = await request(appFor(router, null).app).get('/things');
    expect(res.status).toBe(401);
    expect(res.type).toBe('application/problem+json');
    expect(load).not.toHaveBeenCalled();
  });

  it('answers 404 naming the record to an id that is not a UUID, and passes a UUID on', async () => {
    const { app } = appFor(thingsRouter().router, ['admin']);
    const bad = await request(app).get('/things/not-a-uuid');
    expect(bad.status).toBe(404);
    expect(bad.body.detail).toMatch(/Thing/);
    const id = randomUUID();
    const good = await request(app).get(`/things/${id}`);
    expect(good.status).toBe(200);
    expect(good.body).toEqual({ id });
  });
});

describe('listHandler', () => {
  it('refuses (403) whoever has no rule to read the subject (deny by default), before reading the query', async () => {
    const { router, load } = thingsRouter();
    const res = await request(appFor(router, []).app).get('/things?page=0');
    expect(res.status).toBe(403);
    expect(res.type).toBe('application/problem+json');
    expect(res.body.title).toBe('Forbidden');
    expect(load).not.toHaveBeenCalled();
  });

  it('answers 422 problem JSON to a query that is not valid, and loads nothing', async () => {
    const { router, load } = thingsRouter();
    const res = await request(appFor(router, ['brewer_on_duty']).app).get('/things?page=nope');
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([expect.objectContaining({ path: 'page' })]);
    expect(load).not.toHaveBeenCalled();
  });

  it('narrows the list to the person when a condition limits what they read, and not otherwise', async () => {
    const member = appFor(thingsRouter().router, ['member']);
    const own = await request(member.app).get('/things?page=2');
    expect(own.status).toBe(200);
    expect(own.body).toEqual({ items: [], page: 2, restrictTo: member.user!.id });

    const rota = await request(appFor(thingsRouter().router, ['brewer_on_duty']).app).get('/things');
    expect(rota.status).toBe(200);
    expect(rota.body).toEqual({ items: [], page: 1, restrictTo: null });
  });
});

describe('createHandler', () => {
  it('refuses (403) whoever may not create the subject, before reading the body', async () => {
    const { router, create } = thingsRouter();
    const res = await request(appFor(router, ['treasurer']).app)
      .post('/things')
      .send({});
    expect(res.status).toBe(403);
    expect(create).not.toHaveBeenCalled();
  });

  it('answers 422 to a body that is not valid, and 201 with what was created by whom', async () => {
    const { router, create } = thingsRouter();
    const { app, user } = appFor(router, ['brewer_on_duty']);
    const bad = await request(app).post('/things').send({ name: '' });
    expect(bad.status).toBe(422);
    expect(bad.body.errors).toEqual([expect.objectContaining({ path: 'name' })]);
    expect(create).not.toHaveBeenCalled();
    const made = await request(app).post('/things').send({ name: 'Transfer one' });
    expect(made.status).toBe(201);
    expect(made.body).toEqual({ created: 'Transfer one', by: user!.id });
  });
});
