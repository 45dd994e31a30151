import { describe, expect, it } from 'vitest';
import { applyFreshnessLapses } from '../../backend/modules/equipment/vessel-state.ts';
import { createBatch, createFermenter, createKeg, createSanitationCycle, createTransfer, createUser, cycleSteps, HOUR } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { count } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';
import { pdfText } from '../helpers/pdf.ts';

let ctx: TestContext;
let brewer: ApiClient, member: ApiClient, treasurer: ApiClient, admin: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  [brewer, member, treasurer, admin] = await signInAs(ctx, 'brewer', 'member', 'treasurer', 'admin');
});

const minutesAgo = (m: number) => new Date(ctx.clock.now().getTime() - m * 60_000).toISOString();

/** The four steps of a cycle that meets the co-op's default rules. */
function completeSteps(startMinutesAgo = 120): Record<string, string | number>[] {
  return [
    { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: minutesAgo(startMinutesAgo) },
    { step: 'rinse', at: minutesAgo(startMinutesAgo - 62) },
    { step: 'sanitize', chemical: 'Acid sanitizer (no-rinse, phosphoric)', concentration: 1.6, contactMinutes: 2, at: minutesAgo(startMinutesAgo - 70) },
    { step: 'purge', contactMinutes: 0.5, purgeMethod: 'flush', at: minutesAgo(startMinutesAgo - 75) },
  ];
}

/** A new empty keg in the cellar, needing cleaning: each test takes its own. */
async function takeKeg(): Promise<{ id: string; code: string }> {
  const keg = await createKeg(ctx.db);
  return { id: keg.id, code: keg.code };
}

const stateOf = async (id: string) => (await ctx.db.selectFrom('equipment').select('state').where('id', '=', id).executeTakeFirstOrThrow()).state;

/** The latest change of a vessel's state on record. */
function lastStateChange(equipmentId: string) {
  return ctx.db.selectFrom('equipment_state_change').selectAll().where('equipment_id', '=', equipmentId).orderBy('id', 'desc').executeTakeFirstOrThrow();
}

/** A keg filled straight from a vessel without a sanitation cycle of its own in the transfer. */
function fillUnsanitized(kegId: string, from: { batchId: string; fromEquipmentId: string; at: string; recordedBy: string }) {
  return createTransfer(ctx.db, { ...from, kegIds: [kegId], sanitizeKegs: false });
}

describe('recording a sanitation cycle', () => {
  it('makes a vessel ready when the cycle is complete, with who and when for every step', async () => {
    const keg = await takeKeg();
    await ctx.db.updateTable('equipment').set({ state: 'needs_cleaning' }).where('id', '=', keg.id).execute();
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps() });
    expect(res.status).toBe(201);
    expect(res.body.cycle).toMatchObject({ outcome: 'ready', complete: true, issues: [] });
    expect(res.body.equipment).toMatchObject({ id: keg.id, state: 'ready' });
    expect(res.body.cycle.steps.map((s: { step: string }) => s.step)).toEqual(['clean', 'rinse', 'sanitize', 'purge']);
    const [clean, , sanitize, purge] = res.body.cycle.steps;
    expect(clean).toMatchObject({ chemicalId: 'alkaline-cleaner', concentration: 1.5, concentrationUnit: '%', contactMinutes: 60, ok: true });
    expect(sanitize).toMatchObject({ chemicalId: 'acid-sanitizer', concentrationUnit: 'mL/L', contactMinutes: 2 });
    expect(purge).toMatchObject({ purgeMethod: 'flush', co2Grams: 15 });
    expect(clean.performedBy).toMatchObject({ id: brewer.user.id, name: 'Ada Kettleby' });
    // Fresh for the co-op's window from the last step.
    const fresh = new Date(res.body.cycle.freshUntil).getTime() - new Date(res.body.cycle.completedAt).getTime();
    expect(fresh).toBe(7 * 86_400_000);
    expect(await stateOf(keg.id)).toBe('ready');
    const change = await lastStateChange(keg.id);
    expect(change).toMatchObject({ from_state: 'needs_cleaning', to_state: 'ready', actor_id: brewer.user.id });
    expect(change.reason).toMatch(/complete/);
    const trail = await ctx.db
      .selectFrom('audit_log')
      .selectAll()
      .where('subject_type', '=', 'SanitationCycle')
      .where('subject_id', '=', res.body.cycle.id)
      .execute();
    expect(trail).toHaveLength(1);
  });

  it('records an incomplete cycle but leaves the vessel cleaned, saying what is missing', async () => {
    const keg = await takeKeg();
    await ctx.db.updateTable('equipment').set({ state: 'needs_cleaning' }).where('id', '=', keg.id).execute();
    const steps = completeSteps().slice(0, 3); // no purge
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(res.status).toBe(201);
    expect(res.body.cycle).toMatchObject({ outcome: 'cleaned', complete: false, freshUntil: null });
    expect(res.body.cycle.issues).toEqual([expect.objectContaining({ code: 'missing_step', step: 'purge' })]);
    expect(await stateOf(keg.id)).toBe('cleaned');
    const reason = await ctx.db
      .selectFrom('equipment_state_change')
      .select('reason')
      .where('equipment_id', '=', keg.id)
      .orderBy('id', 'desc')
      .executeTakeFirstOrThrow();
    expect(reason.reason).toMatch(/incomplete.*No CO2 purge step/);
  });

  it('refuses a contact time below the minimum (422 naming the step and the rule) and changes nothing', async () => {
    const keg = await takeKeg();
    await ctx.db.updateTable('equipment').set({ state: 'needs_cleaning' }).where('id', '=', keg.id).execute();
    const before = await count(ctx, 'sanitation_cycle');
    const steps = completeSteps();
    steps[0] = { ...steps[0]!, contactMinutes: 10 };
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.detail).toMatch(/^Clean step: contact time 10 min is below the minimum of 30 min\./);
    expect(res.body.errors).toEqual([{ path: 'steps.0.contactMinutes', message: 'Clean step: contact time 10 min is below the minimum of 30 min.' }]);
    expect(await count(ctx, 'sanitation_cycle')).toBe(before);
    expect(await stateOf(keg.id)).toBe('needs_cleaning');
  });

  it('refuses a short sanitize contact as well, and flags steps out of order', async () => {
    const keg = await takeKeg();
    const steps = completeSteps();
    steps[2] = { ...steps[2]!, contactMinutes: 0.25 };
    const short = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(short.status).toBe(422);
    expect(short.body.errors[0]).toMatchObject({ path: 'steps.2.contactMinutes', message: expect.stringMatching(/15 s is below the minimum of 1 min/) });

    const backwards = completeSteps();
    backwards[1] = { ...backwards[1]!, at: minutesAgo(200) }; // rinse before the clean
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: backwards });
    expect(res.body.cycle.outcome).toBe('needs_cleaning');
    expect(res.body.cycle.issues).toEqual([expect.objectContaining({ code: 'out_of_order', step: 'rinse' })]);
  });

  it('refuses a vessel that holds beer or is out of service (409), and other kinds of equipment (422)', async () => {
    const keg = await takeKeg();
    await ctx.db.updateTable('equipment').set({ state: 'holding' }).where('id', '=', keg.id).execute();
    const full = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps() });
    expect(full.status).toBe(409);
    expect(full.headers['content-type']).toMatch(/problem\+json/);
    expect(full.body.detail).toMatch(/holds beer/);
    await ctx.db.updateTable('equipment').set({ state: 'out_of_service' }).where('id', '=', keg.id).execute();
    expect((await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps() })).status).toBe(409);
    const tap = await ctx.db.selectFrom('equipment').select('id').where('kind', '=', 'tap').executeTakeFirstOrThrow();
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: tap.id, steps: completeSteps() });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].path).toBe('equipmentId');
  });

  it('validates the body: step names, times with offsets, no future steps, known vessels', async () => {
    const keg = await takeKeg();
    const bad = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: [{ step: 'scrub', at: 'yesterday' }] });
    expect(bad.status).toBe(422);
    expect(bad.body.errors.map((e: { path: string }) => e.path).sort()).toEqual(['steps.0.at', 'steps.0.step']);
    const future = completeSteps();
    future[3] = { ...future[3]!, at: new Date(ctx.clock.now().getTime() + 3 * 3600_000).toISOString() };
    const f = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: future });
    expect(f.status).toBe(422);
    expect(f.body.errors[0].path).toBe('steps.3.at');
    const unknown = await brewer.post('/api/sanitation-cycles', { equipmentId: '00000000-0000-4000-8000-000000000000', steps: completeSteps() });
    expect(unknown.status).toBe(404);
  });

  it('records who did a step when it was someone else on the rota', async () => {
    const keg = await takeKeg();
    const colleague = await ctx.db.selectFrom('app_user').select(['id', 'name']).where('email', '=', 'member5@example.org').executeTakeFirstOrThrow();
    const steps = completeSteps().map((s) => (s.step === 'clean' ? { ...s, performedBy: colleague.id } : s));
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(res.status).toBe(201);
    expect(res.body.cycle.steps[0].performedBy).toEqual({ id: colleague.id, name: colleague.name });
    expect(res.body.cycle.steps[1].performedBy.id).toBe(brewer.user.id);
    expect(res.body.cycle.recordedBy.id).toBe(brewer.user.id);
  });
});

describe('continuing a cycle', () => {
  it('completes a cycle cleaned one day and sanitized the next, and refuses to continue a complete one', async () => {
    const keg = await takeKeg();
    const [clean, rinse, sanitize, purge] = completeSteps(26 * 60);
    const first = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: [clean, rinse] });
    expect(first.body.cycle.outcome).toBe('cleaned');
    const later = [
      { ...sanitize!, at: minutesAgo(20) },
      { ...purge!, at: minutesAgo(15) },
    ];
    expect((await member.post(`/api/sanitation-cycles/${first.body.cycle.id}/steps`, { steps: later })).status).toBe(403);
    const res = await brewer.post(`/api/sanitation-cycles/${first.body.cycle.id}/steps`, { steps: later });
    expect(res.status).toBe(200);
    expect(res.body.cycle).toMatchObject({ id: first.body.cycle.id, outcome: 'ready', complete: true });
    expect(res.body.cycle.steps.map((s: { step: string }) => s.step)).toEqual(['clean', 'rinse', 'sanitize', 'purge']);
    expect(await stateOf(keg.id)).toBe('ready');
    const again = await brewer.post(`/api/sanitation-cycles/${first.body.cycle.id}/steps`, { steps: later });
    expect(again.status).toBe(409);
  });
});

describe('who may do what', () => {
  it('lets neither a member nor the treasurer record a cycle (403), and nothing is written', async () => {
    const keg = await takeKeg();
    const before = await ctx.db
      .selectFrom('sanitation_cycle')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    for (const who of [member, treasurer]) {
      const res = await who.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps() });
      expect(res.status).toBe(403);
      expect(res.headers['content-type']).toMatch(/problem\+json/);
    }
    const after = await ctx.db
      .selectFrom('sanitation_cycle')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    expect(after.n).toBe(before.n);
  });

  it('lets the treasurer read the log but not a member; nobody signed out', async () => {
    expect((await treasurer.get('/api/sanitation-cycles')).status).toBe(200);
    expect((await member.get('/api/sanitation-cycles')).status).toBe(403);
    expect((await member.get('/api/sanitation-status')).status).toBe(403);
    const anon = await (await import('supertest')).default(ctx.app).get('/api/sanitation-cycles');
    expect(anon.status).toBe(401);
  });

  it('keeps the audit report from members (403) but gives it to the rota, the treasurer and the admin', async () => {
    const url = '/api/reports/sanitation-audit.pdf?from=2026-09-01&to=2026-11-30';
    expect((await member.get(url)).status).toBe(403);
    for (const who of [brewer, treasurer, admin]) {
      const res = await who.get(url).buffer(true);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toMatch(/application\/pdf/);
    }
  });
});

describe('the log and the vessels’ standing', () => {
  it('lists cycles newest first, filters by vessel and outcome, and pages', async () => {
    const keg = await takeKeg();
    await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps(300) });
    await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps(200).slice(0, 2) });
    // This test's two cycles, from the last eight hours.
    const since = encodeURIComponent(new Date(ctx.clock.now().getTime() - 8 * 3600_000).toISOString());
    const res = await brewer.get(`/api/sanitation-cycles?equipmentId=${keg.id}&from=${since}`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(2);
    expect(res.body.items.map((c: { outcome: string }) => c.outcome)).toEqual(['cleaned', 'ready']);
    const ready = await brewer.get(`/api/sanitation-cycles?equipmentId=${keg.id}&outcome=ready&from=${since}`);
    expect(ready.body.items).toHaveLength(1);
    const paged = await brewer.get('/api/sanitation-cycles?pageSize=1&page=2&sort=equipmentCode&order=asc');
    expect(paged.body).toMatchObject({ page: 2, pageSize: 1 });
    expect(paged.body.items).toHaveLength(1);
    const one = await treasurer.get(`/api/sanitation-cycles/${res.body.items[0].id}`);
    expect(one.body.cycle.equipment.code).toBe(keg.code);
    expect((await brewer.get('/api/sanitation-cycles?sort=colour')).status).toBe(422);
  });

  it('treats a lapsed freshness window as needs cleaning at once, and the periodic pass writes it down', async () => {
    // A keg none of whose cycles is still fresh.
    const keg = await takeKeg();
    const old = completeSteps(10 * 24 * 60); // ten days ago
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: old });
    expect(res.body.cycle.outcome).toBe('ready');
    expect(await stateOf(keg.id)).toBe('ready');
    const status = await brewer.get(`/api/sanitation-status?q=${keg.code}`);
    expect(status.body.items[0]).toMatchObject({ code: keg.code, state: 'needs_cleaning', storedState: 'ready' });
    expect(status.body.items[0].stateReason).toMatch(/lapsed/);
    expect(await applyFreshnessLapses(ctx.db, ctx.clock.now())).toBeGreaterThanOrEqual(1);
    expect(await stateOf(keg.id)).toBe('needs_cleaning');
    const change = await lastStateChange(keg.id);
    expect(change).toMatchObject({ from_state: 'ready', to_state: 'needs_cleaning', actor_id: null });
    expect(change.reason).toMatch(/Freshness window lapsed/);
    // Once written down, a second pass changes nothing for it.
    const again = await applyFreshnessLapses(ctx.db, ctx.clock.now());
    const changes = await ctx.db
      .selectFrom('equipment_state_change')
      .select('id')
      .where('equipment_id', '=', keg.id)
      .where('reason', 'like', 'Freshness%')
      .where('at', '>', new Date(ctx.clock.now().getTime() - 3600_000))
      .execute();
    expect(changes).toHaveLength(1);
    expect(again).toBeGreaterThanOrEqual(0);
  });
});

describe('the sanitation audit PDF', () => {
  it('holds the vessels, cycles, people and exceptions of the period in its text layer', async () => {
    const keg = await takeKeg();
    const steps = completeSteps(500);
    steps[0] = { ...steps[0]!, contactMinutes: 12, exceptionReason: 'Soak cut short by a power cut' };
    expect((await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps })).status).toBe(201);
    await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps(300) });
    const today = ctx.clock.now().toISOString().slice(0, 10); // the report's days are UTC days
    const res = await treasurer.get(`/api/reports/sanitation-audit.pdf?from=${today}&to=${today}&equipmentId=${keg.id}`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const text = pdfText(res.body as Buffer);
    expect(text).toContain('Sanitation audit');
    expect(text).toContain('Larkspur Yard Brewing Co-op');
    expect(text).toContain(keg.code);
    expect(text).toContain('Ada Kettleby');
    expect(text).toContain('Alkaline cleaner (oxygen-based powder)');
    expect(text).toContain('Recorded exception');
    expect(text).toMatch(/contact time 12 min is\s+below\s+the minimum of 30 min/);
    expect(text).toMatch(/Soak cut short by a power cut/);
    expect(text).toMatch(/Page 1 of \d+/);
    expect(text).toMatch(/never water to chemical/);
    expect(text).toMatch(/local codes/i);
  });

  it('covers an autumn of records: every vessel, the rota, and the exceptions in them', async () => {
    // An autumn's records on new vessels, each with one lapse of the co-op's rules (7-day freshness
    // window, cleaning within 2 days of emptying, sanitize contact of at least 1 min). Times are UTC, as the report prints them.
    const ada = brewer.user.id;
    const odile = fixtureUserId('member5');
    const amadou = (await createUser(ctx.db, { name: 'Amadou Kestrel', roles: ['member', 'brewer_on_duty'] })).id;
    const readings = (start: string) => [
      { takenAt: new Date(new Date(start).getTime() + 2 * HOUR), value: 1.05 },
      { takenAt: new Date(new Date(start).getTime() + 200 * HOUR), value: 1.011 },
    ];

    // F-a: sanitized 1 Sep, filled with wort, emptied 14 Sep 10:00 into a keg with no cycle on record,
    // cleaned 60 hours later (14 Sep 10:00 + 60 h = 16 Sep 22:00; the purge 80 min on, 23:20), then left unused.
    const fa = await createFermenter(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: fa.id, readyAt: '2026-09-01T08:00:00Z', recordedBy: ada });
    const batchA = await createBatch(ctx.db, {
      readings: readings('2026-09-01T09:00:00Z'),
      fermenter: { equipmentId: fa.id, startsAt: '2026-09-01T09:00:00Z', endsAt: '2026-09-14T10:00:00Z' },
    });
    const kegNoCycle = await createKeg(ctx.db);
    await fillUnsanitized(kegNoCycle.id, { batchId: batchA.id, fromEquipmentId: fa.id, at: '2026-09-14T10:00:00Z', recordedBy: ada });
    await createSanitationCycle(ctx.db, { equipmentId: fa.id, readyAt: '2026-09-16T23:20:00Z', recordedBy: odile });

    // A keg whose sanitize step had 30 s, below the 1 min minimum, recorded as an exception with its reason.
    const kegShort = await createKeg(ctx.db);
    const shortSteps = cycleSteps('2026-10-07T11:00:00Z', { performedBy: amadou }).map((st) =>
      st.step === 'sanitize' ? { ...st, contactMinutes: 0.5, exceptionReason: 'Sanitizer drained too soon' } : st,
    );
    await createSanitationCycle(ctx.db, { equipmentId: kegShort.id, steps: shortSteps, recordedBy: amadou });

    // A keg sanitized 1 Oct 09:00 (fresh until 8 Oct 09:00) and filled on 20 Oct from F-b.
    const fb = await createFermenter(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: fb.id, readyAt: '2026-10-05T08:00:00Z', recordedBy: odile });
    const batchB = await createBatch(ctx.db, {
      readings: readings('2026-10-05T09:00:00Z'),
      fermenter: { equipmentId: fb.id, startsAt: '2026-10-05T09:00:00Z', endsAt: '2026-10-20T10:00:00Z' },
    });
    const kegLapsed = await createKeg(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: kegLapsed.id, readyAt: '2026-10-01T09:00:00Z', recordedBy: ada });
    await fillUnsanitized(kegLapsed.id, { batchId: batchB.id, fromEquipmentId: fb.id, at: '2026-10-20T10:00:00Z', recordedBy: ada });
    await createSanitationCycle(ctx.db, { equipmentId: fb.id, readyAt: '2026-10-21T09:00:00Z', recordedBy: ada });

    // F-c: cleaned and rinsed on 10 Nov, never sanitized.
    const fc = await createFermenter(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: fc.id, readyAt: '2026-11-10T15:00:00Z', until: 'cleaned', recordedBy: amadou });

    const res = await brewer.get('/api/reports/sanitation-audit.pdf?from=2026-09-01&to=2026-11-30').buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const text = pdfText(res.body as Buffer);
    const [{ n: cycles }] = [
      await ctx.db
        .selectFrom('sanitation_cycle')
        .select((eb) => eb.fn.countAll<number>().as('n'))
        .where('completed_at', '>=', new Date('2026-09-01T00:00:00Z'))
        .where('completed_at', '<', new Date('2026-12-01T00:00:00Z'))
        .executeTakeFirstOrThrow(),
    ];
    // Seven cycles above, and the one ten days before the test clock's now (22 Nov) from the lapsed-window test.
    expect(cycles).toBe(8);
    const vessels = await ctx.db.selectFrom('equipment').select('code').where('kind', 'in', ['fermenter', 'keg']).execute();
    expect(text).toContain(`${vessels.length} vessels · ${cycles} cycles`);
    expect(text).toMatch(/Period 1 Sept? 2026 to 30 Nov 2026/); // ICU writes Sep or Sept for en-GB
    for (const v of vessels) expect(text).toContain(v.code);
    for (const person of ['Ada Kettleby', 'Odile Marsh', 'Amadou Kestrel']) expect(text).toContain(person);
    // The exceptions built in above.
    expect(text).toMatch(new RegExp(`${kegNoCycle.code}\\s+14 Sept? 2026, 10:00\\s*Fill with no cycle on record`));
    expect(text).toMatch(
      new RegExp(`${kegShort.code}\\s+7 Oct 2026, 11:00\\s*Recorded exception\\s+Recorded as an exception: Sanitize step: contact time 30 s`),
    );
    expect(text).toMatch(/Reason given: Sanitizer\s+drained\s+too\s+soon/);
    expect(text).toMatch(new RegExp(`${kegLapsed.code}\\s+20 Oct 2026, 10:00\\s*Fill after the freshness window lapsed`));
    expect(text).toMatch(new RegExp(`${fc.code}\\s+10 Nov 2026, 15:00\\s*Incomplete cycle`));
    // Cleaning started 16 Sep 22:00, 60 hours after the 14 Sep 10:00 transfer (2 days allowed).
    expect(text).toMatch(new RegExp(`${fa.code}\\s+16 Sept? 2026, 22:00\\s*Late cycle\\s+Cleaned 60 hours after it was emptied`));
    // F-a's window from that cycle ended 23 Sep 23:20 with no fill or cycle since.
    expect(text).toMatch(new RegExp(`${fa.code}\\s+23 Sept? 2026, 23:20\\s*Freshness window lapsed`));
  });

  it('answers 422 for a missing or reversed period', async () => {
    expect((await brewer.get('/api/reports/sanitation-audit.pdf')).status).toBe(422);
    expect((await brewer.get('/api/reports/sanitation-audit.pdf?from=2026-11-30&to=2026-09-01')).status).toBe(422);
  });
});
