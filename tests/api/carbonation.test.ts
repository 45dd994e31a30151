import { describe, expect, it } from 'vitest';
import { sendDueReminders } from '../../backend/modules/carbonation/carbonation.service.ts';
import { batchPool, fillNewKegs, kegPool } from '../helpers/cellar.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';

let ctx: TestContext;
let brewer: ApiClient, member: ApiClient;
let takeKegs: ReturnType<typeof kegPool>;
let takeBatch: ReturnType<typeof batchPool>;

useTestContext(async (created) => {
  ctx = created;
  [brewer, member] = await signInAs(ctx, 'brewer', 'member');
  takeKegs = kegPool(ctx);
  takeBatch = batchPool(ctx);
});

const psi = (kpa: number) => kpa / 6.894757293168361;
const fToC = (f: number) => (f - 32) / 1.8;

async function filledKeg() {
  const batch = await takeBatch();
  const {
    kegs: [keg],
  } = await fillNewKegs(ctx, brewer, batch, 1);
  return { keg: keg!, batch };
}

describe('the planner’s pressures against the published carbonation values (REFERENCE §5)', () => {
  // [P] S26 brewery CO2 selection chart at 2.5 volumes, sea level (±0.25 psi); [P2] DBQM 2.4 vol at 38 °F (±0.2).
  const published: [volumes: number, f: number, psig: number, tol: number][] = [
    [2.5, 32, 8.4, 0.25],
    [2.5, 34, 9.1, 0.25],
    [2.5, 36, 10.2, 0.25],
    [2.5, 38, 11.3, 0.25],
    [2.5, 40, 12.4, 0.25],
    [2.5, 42, 13.3, 0.25],
    [2.4, 38, 10.3, 0.2],
  ];
  for (const [volumes, f, psig, tol] of published) {
    it(`${volumes} volumes at ${f} °F needs ${psig} psig`, async () => {
      const res = await brewer.post('/api/carbonation-plans/preview', { targetVolumes: volumes, temperatureC: fToC(f), altitudeM: 0, method: 'set_and_hold' });
      expect(res.status).toBe(200);
      expect(Math.abs(psi(res.body.plan.servingPressureKpa) - psig)).toBeLessThanOrEqual(tol);
    });
  }

  it('adds about 1 psi per 2,000 ft of altitude (REFERENCE §8)', async () => {
    const sea = await brewer.post('/api/carbonation-plans/preview', { targetVolumes: 2.5, temperatureC: fToC(38), altitudeM: 0, method: 'set_and_hold' });
    const high = await brewer.post('/api/carbonation-plans/preview', {
      targetVolumes: 2.5,
      temperatureC: fToC(38),
      altitudeM: 2000 * 0.3048,
      method: 'set_and_hold',
    });
    expect(psi(high.body.plan.servingPressureKpa - sea.body.plan.servingPressureKpa)).toBeCloseTo(1.0, 1);
  });

  it('warns that a fast start left on would reach about 4.3 volumes at 30 psig and 38 °F, and that shaking over-carbonates', async () => {
    const res = await brewer.post('/api/carbonation-plans/preview', {
      targetVolumes: 2.5,
      temperatureC: fToC(38),
      altitudeM: 0,
      method: 'fast_start',
      fastStartPressureKpa: 30 * 6.894757293168361,
      fastStartHours: 72,
      startedAt: '2026-11-20T10:00:00+00:00',
    });
    expect(res.body.plan.fastStartEquilibriumVolumes).toBeCloseTo(4.31, 1);
    expect(res.body.plan.lowerPressureAt).toBe('2026-11-23T10:00:00.000Z');
    expect(res.body.plan.readyAt).toBe('2026-11-25T10:00:00.000Z');
    expect(res.body.plan.warnings.join(' ')).toMatch(/shake/i);
  });
});

describe('carbonation plans for a keg', () => {
  it('saves a set-and-hold plan with its ready date and the check of the tap’s line', async () => {
    const { keg } = await filledKeg();
    const tap = await ctx.db
      .selectFrom('equipment')
      .select(['id', 'attributes'])
      .where('kind', '=', 'tap')
      .where('state', '<>', 'out_of_service')
      .orderBy('code')
      .executeTakeFirstOrThrow();
    const res = await brewer.post('/api/carbonation-plans', {
      kegId: keg.id,
      targetVolumes: 2.4,
      styleFamily: 'American ales and IPAs',
      method: 'set_and_hold',
      tapId: tap.id,
      startedAt: '2026-12-01T09:00:00+00:00',
    });
    expect(res.status).toBe(201);
    const plan = res.body.plan;
    expect(plan).toMatchObject({
      state: 'active',
      method: 'set_and_hold',
      temperatureC: 3,
      holdDays: 14,
      readyAt: '2026-12-15T09:00:00.000Z',
      keg: { id: keg.id },
    });
    expect(plan.line).toMatchObject({ tapId: tap.id });
    expect(typeof plan.line.suits).toBe('boolean');
    expect(plan.line.balancedLengthM).toBeGreaterThan(0);
    expect(plan.line.verdict).toMatch(/m/);
    const shown = await brewer.get(`/api/kegs/${keg.id}`);
    expect(shown.body.keg.carbonation).toMatchObject({ planId: plan.id, method: 'set_and_hold' });
    // A second plan replaces the first.
    const again = await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.6, method: 'set_and_hold' });
    expect(again.status).toBe(201);
    const first = await brewer.get(`/api/carbonation-plans/${plan.id}`);
    expect(first.body.plan.state).toBe('superseded');
  });

  it('queues the reminder to lower the pressure after a fast start, and e-mails the brewers on duty when it is due', async () => {
    const { keg } = await filledKeg();
    const startedAt = new Date(ctx.clock.now().getTime() - 73 * 3600_000).toISOString();
    const res = await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.5, method: 'fast_start', startedAt });
    expect(res.status).toBe(201);
    const plan = res.body.plan;
    expect(plan.fastPressureKpa).toBeCloseTo(207, 0);
    expect(plan.fastHours).toBe(72);
    const row = await ctx.db.selectFrom('carbonation_plan').select(['reminder_job_id']).where('id', '=', plan.id).executeTakeFirstOrThrow();
    expect(row.reminder_job_id).toBeTruthy();
    const mail = await ctx.waitForMail('brewer@example.org', /Lower the pressure on keg/);
    expect(mail.subject).toContain(keg.code);
    // Pressures through the one formatter, in both unit systems: "to 0.83 bar (12.0 psi)".
    expect(mail.subject).toMatch(/to \d+\.\d{2} bar \(\d+\.\d psi\)$/);
    expect(mail.text_body).toMatch(/serving pressure: \d+ kPa \(\d+\.\d{2} bar, \d+\.\d psi\)/);
    expect(mail.text_body).toMatch(/over-carbonates/);
    expect(mail.text_body).toMatch(/CO2 displaces air/);
    const sent = await brewer.get(`/api/carbonation-plans/${plan.id}`);
    expect(sent.body.plan.reminderSentAt).toBeTruthy();
    // Never twice, even if the periodic pass looks again.
    expect(await sendDueReminders(ctx.db, ctx.deps.queue, ctx.clock.now())).toBe(0);
    const due = await brewer.get('/api/carbonation-plans?lowerDue=true');
    expect(due.body.items.map((p: { id: string }) => p.id)).toContain(plan.id);
    const lowered = await brewer.post(`/api/carbonation-plans/${plan.id}/pressure-lowered`);
    expect(lowered.body.plan.pressureLoweredAt).toBeTruthy();
    const after = await brewer.get('/api/carbonation-plans?lowerDue=true');
    expect(after.body.items.map((p: { id: string }) => p.id)).not.toContain(plan.id);
  });

  it('refuses pressures above the co-op limit (422), empty kegs (409) and members (403)', async () => {
    const { keg, batch } = await filledKeg();
    const hot = await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.5, method: 'fast_start', fastStartPressureKpa: 380 });
    expect(hot.status).toBe(422);
    expect(hot.body.errors[0].path).toBe('fastStartPressureKpa');
    const [empty] = await takeKegs(1);
    expect((await brewer.post('/api/carbonation-plans', { kegId: empty!.id, targetVolumes: 2.5, method: 'set_and_hold' })).status).toBe(409);
    expect((await member.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.5, method: 'set_and_hold' })).status).toBe(403);
    // The batch's owner reads their own keg's plan; another member does not see it.
    const plan = (await brewer.post('/api/carbonation-plans', { kegId: keg.id, targetVolumes: 2.5, method: 'set_and_hold' })).body.plan;
    const owner = await ctx.db.selectFrom('app_user').select('email').where('id', '=', batch.ownerId).executeTakeFirstOrThrow();
    const ownerClient = await ctx.signIn(owner.email);
    expect((await ownerClient.get(`/api/carbonation-plans/${plan.id}`)).status).toBe(200);
    const outsider = ownerClient.user.id === member.user.id ? await ctx.signIn('member2@example.org') : member;
    expect((await outsider.get(`/api/carbonation-plans/${plan.id}`)).status).toBe(404);
  });
});
