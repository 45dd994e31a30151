import type request from 'supertest';
import { describe, expect, it } from 'vitest';
import { createFermenter, createKeg } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext, signInAs } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';
import { pdfText } from '../helpers/pdf.ts';

/**
 * Checked sanitation (shared/cellar/sanitation-rules.ts `checkSteps`): a step outside the chemical's
 * working strength, below its minimum contact, a short CO2 flush, a chemical not in the list or in
 * the wrong step, times that contradict a contact time, or a caustic clean without venting is 422
 * and writes nothing; a step with an exception reason is recorded and the audit report lists it.
 */

let ctx: TestContext;
let brewer: ApiClient, admin: ApiClient;

useTestContext(async (created) => {
  ctx = created;
  [brewer, admin] = await signInAs(ctx, 'brewer', 'admin');
});

type Step = Record<string, string | number | boolean>;
const minutesAgo = (m: number) => new Date(ctx.clock.now().getTime() - m * 60_000).toISOString();
function completeSteps(startMinutesAgo = 120): Step[] {
  return [
    { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: minutesAgo(startMinutesAgo) },
    { step: 'rinse', at: minutesAgo(startMinutesAgo - 62) },
    { step: 'sanitize', chemical: 'acid-sanitizer', concentration: 1.6, contactMinutes: 2, at: minutesAgo(startMinutesAgo - 70) },
    { step: 'purge', contactMinutes: 0.5, purgeMethod: 'flush', at: minutesAgo(startMinutesAgo - 75) },
  ];
}
const patch = (i: number, p: Step, steps = completeSteps()) => steps.map((s, j) => (j === i ? { ...s, ...p } : s));

async function dirtyKeg() {
  const keg = await createKeg(ctx.db);
  await ctx.db.updateTable('equipment').set({ state: 'needs_cleaning' }).where('id', '=', keg.id).execute();
  return keg;
}

/** What a refused record must leave as it was. */
async function snapshot(vesselId: string) {
  const n = async (table: 'sanitation_cycle' | 'sanitation_step' | 'equipment_state_change' | 'audit_log') =>
    Number(
      (
        await ctx.db
          .selectFrom(table)
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .executeTakeFirstOrThrow()
      ).n,
    );
  const vessel = await ctx.db.selectFrom('equipment').select(['state', 'updated_at']).where('id', '=', vesselId).executeTakeFirstOrThrow();
  return {
    cycles: await n('sanitation_cycle'),
    steps: await n('sanitation_step'),
    changes: await n('equipment_state_change'),
    audit: await n('audit_log'),
    vessel,
  };
}

function expectProblem(res: request.Response, path: string, message: RegExp) {
  expect(res.status).toBe(422);
  expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  expect(res.body.errors).toEqual(expect.arrayContaining([{ path, message: expect.stringMatching(message) }]));
}

describe('refused sanitation steps', () => {
  it('refuses the reviewed cycle (0.1 % cleaner, 0.01 mL/L sanitizer, a 0-second purge), naming each step and rule, and changes nothing', async () => {
    const keg = await dirtyKeg();
    const before = await snapshot(keg.id);
    let steps = patch(0, { concentration: 0.1 });
    steps = patch(2, { concentration: 0.01 }, steps);
    steps = patch(3, { contactMinutes: 0 }, steps);
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(res.status).toBe(422);
    expect(res.body.detail).toMatch(
      /^Clean step: 0\.1 % is below the working strength of Alkaline cleaner .*\(0\.75–3 %\)\. Correct it, or record the step as an exception with a reason\./,
    );
    expect(res.body.errors.map((e: { path: string }) => e.path)).toEqual(['steps.0.concentration', 'steps.2.concentration', 'steps.3.contactMinutes']);
    expect(res.body.errors[2].message).toBe("Purge step: a CO2 flush of 0 s is below the co-op's minimum of 20 s.");
    expect(await snapshot(keg.id)).toEqual(before);
  });

  const cases: { name: string; steps: () => Step[]; path: string; message: RegExp }[] = [
    {
      name: 'a strength above the range',
      steps: () => patch(0, { concentration: 6 }),
      path: 'steps.0.concentration',
      message: /6 % is above the working strength/,
    },
    {
      name: 'a sanitize contact below the minimum',
      steps: () => patch(2, { contactMinutes: 0.5 }),
      path: 'steps.2.contactMinutes',
      message: /Sanitize step: contact time 30 s is below the minimum of 1 min/,
    },
    {
      name: 'a flush below the co-op minimum',
      steps: () => patch(3, { contactMinutes: 0.25 }),
      path: 'steps.3.contactMinutes',
      message: /CO2 flush of 15 s is below the co-op's minimum of 20 s/,
    },
    {
      name: 'one chemical for the clean and the sanitize',
      steps: () => patch(2, { chemical: 'Alkaline cleaner (oxygen-based powder)', concentration: 1.5 }),
      path: 'steps.2.chemical',
      message: /same chemical was named for the clean/,
    },
    {
      name: 'a cleaner used to sanitize',
      steps: () => patch(2, { chemical: 'caustic-cleaner', concentration: 2 }),
      path: 'steps.2.chemical',
      message: /Caustic cleaner \(sodium hydroxide\) is a cleaner, not a sanitizer/,
    },
    {
      name: 'a sanitizer used to clean',
      steps: () => patch(0, { chemical: 'peracetic-sanitizer', concentration: 150 }),
      path: 'steps.0.chemical',
      message: /is a sanitizer, not a cleaner/,
    },
    {
      name: 'free text not in the list',
      steps: () => patch(2, { chemical: 'Dish soap' }),
      path: 'steps.2.chemical',
      message: /"Dish soap" is not a sanitizer in the co-op's list/,
    },
    {
      name: 'a contact time longer than the gap to the next step',
      steps: () => patch(1, { at: minutesAgo(90) }),
      path: 'steps.0.contactMinutes',
      message: /60 min does not fit before the rinse step, 30 min later/,
    },
    {
      name: 'a caustic clean without venting',
      steps: () => patch(0, { chemical: 'caustic-cleaner', concentration: 2, contactMinutes: 30 }),
      path: 'steps.0.vented',
      message: /caustic: vent the vessel to atmospheric pressure first/,
    },
    {
      name: 'a push-out purge that names no keg',
      steps: () => patch(3, { purgeMethod: 'push_out', contactMinutes: 0 }),
      path: 'steps.3.pushedIntoEquipmentId',
      message: /names the keg the sanitizer was pushed into/,
    },
    {
      name: 'an exception reason on a step that breaks no rule',
      steps: () => patch(1, { exceptionReason: 'Just in case' }),
      path: 'steps.1.exceptionReason',
      message: /breaks no rule/,
    },
  ];
  for (const c of cases) {
    it(`refuses ${c.name} (422) and changes nothing`, async () => {
      const keg = await dirtyKeg();
      const before = await snapshot(keg.id);
      const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: c.steps() });
      expectProblem(res, c.path, c.message);
      expect(await snapshot(keg.id)).toEqual(before);
    });
  }

  it('refuses a reason on what cannot be excepted: times that contradict the contact time, a skipped vent', async () => {
    const keg = await dirtyKeg();
    const before = await snapshot(keg.id);
    const gap = patch(0, { exceptionReason: 'Recorded the times later' }, patch(1, { at: minutesAgo(90) }));
    expectProblem(await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: gap }), 'steps.0.contactMinutes', /does not fit/);
    const vent = patch(0, { chemical: 'caustic-cleaner', concentration: 2, contactMinutes: 30, vented: false, exceptionReason: 'Vented later' });
    expectProblem(await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: vent }), 'steps.0.vented', /vent the vessel/);
    expect(await snapshot(keg.id)).toEqual(before);
  });

  it('checks the keg a push-out purge names: a keg the co-op has, not a fermenter, not the keg itself', async () => {
    const keg = await dirtyKeg();
    const fermenter = await createFermenter(ctx.db);
    const before = await snapshot(keg.id);
    for (const [target, message] of [
      [fermenter.id, /not a keg the co-op has/],
      ['00000000-0000-4000-8000-00000000abcd', /not a keg the co-op has/],
      [keg.id, /cannot be pushed into itself/],
    ] as const) {
      const res = await brewer.post('/api/sanitation-cycles', {
        equipmentId: keg.id,
        steps: patch(3, { purgeMethod: 'push_out', pushedIntoEquipmentId: target }),
      });
      expect(res.status).toBe(422);
      expect(res.body.errors[0].path).toBe('steps.3.pushedIntoEquipmentId');
      expect(res.body.detail).toMatch(message);
    }
    expect(await snapshot(keg.id)).toEqual(before);
  });

  it('refuses a continued cycle whose new step breaks a rule, naming the step as sent', async () => {
    const keg = await dirtyKeg();
    const [clean, rinse, sanitize, purge] = completeSteps(26 * 60);
    const first = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: [clean, rinse] });
    expect(first.status).toBe(201);
    const before = await snapshot(keg.id);
    const res = await brewer.post(`/api/sanitation-cycles/${first.body.cycle.id}/steps`, {
      steps: [
        { ...sanitize!, at: minutesAgo(20), concentration: 9 },
        { ...purge!, at: minutesAgo(15) },
      ],
    });
    expectProblem(res, 'steps.0.concentration', /9 mL\/L is above the working strength/);
    expect(await snapshot(keg.id)).toEqual(before);
    expect((await ctx.db.selectFrom('equipment').select('state').where('id', '=', keg.id).executeTakeFirstOrThrow()).state).toBe('cleaned');
  });
});

describe('what passes', () => {
  it('records a caustic clean confirmed as vented, and a push-out purge with its second keg', async () => {
    const keg = await dirtyKeg();
    const other = await createKeg(ctx.db);
    let steps = patch(0, { chemical: 'caustic-cleaner', concentration: 2, contactMinutes: 30, vented: true });
    steps = patch(3, { purgeMethod: 'push_out', pushedIntoEquipmentId: other.id }, steps).map((s) =>
      s.step === 'purge' ? (({ contactMinutes: _c, ...rest }) => rest)(s) : s,
    );
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(res.status).toBe(201);
    expect(res.body.cycle).toMatchObject({ outcome: 'ready', issues: [] });
    expect(res.body.cycle.steps[0]).toMatchObject({ chemicalId: 'caustic-cleaner', vented: true, exceptionReason: null, exceptionRules: [] });
    expect(res.body.cycle.steps[3]).toMatchObject({ purgeMethod: 'push_out', pushedInto: { id: other.id, code: other.code } });
    const stored = await ctx.db
      .selectFrom('sanitation_step')
      .select(['step', 'vented', 'pushed_into_equipment_id'])
      .where('cycle_id', '=', res.body.cycle.id)
      .orderBy('position')
      .execute();
    expect(stored[0]).toMatchObject({ vented: true });
    expect(stored[3]).toMatchObject({ pushed_into_equipment_id: other.id });
  });

  it('records a step outside a rule with a reason as an exception: the keg is ready, the cycle and the audit report list it', async () => {
    const keg = await dirtyKeg();
    const steps = patch(2, { concentration: 0.9, exceptionReason: 'Last of the sanitizer, made up weak; kept for a member’s own use' });
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps });
    expect(res.status).toBe(201);
    expect(res.body.cycle.outcome).toBe('ready');
    expect(res.body.equipment.state).toBe('ready');
    expect(res.body.cycle.steps[2]).toMatchObject({
      ok: true,
      exceptionReason: 'Last of the sanitizer, made up weak; kept for a member’s own use',
      exceptionRules: ['strength_low'],
    });
    expect(res.body.cycle.issues).toEqual([
      {
        code: 'exception',
        step: 'sanitize',
        message: expect.stringMatching(
          /^Recorded as an exception: Sanitize step: 0\.9 mL\/L is below the working strength .* Reason given: Last of the sanitizer/,
        ),
      },
    ]);
    const row = await ctx.db
      .selectFrom('sanitation_step')
      .select(['exception_reason', 'exception_rules'])
      .where('cycle_id', '=', res.body.cycle.id)
      .where('step', '=', 'sanitize')
      .executeTakeFirstOrThrow();
    expect(row).toEqual({ exception_reason: 'Last of the sanitizer, made up weak; kept for a member’s own use', exception_rules: ['strength_low'] });

    const today = ctx.clock.now().toISOString().slice(0, 10);
    const pdf = await brewer.get(`/api/reports/sanitation-audit.pdf?from=${today}&to=${today}&equipmentId=${keg.id}`).buffer(true).parse(binary);
    expect(pdf.status).toBe(200);
    const text = pdfText(pdf.body as Buffer);
    expect(text).toMatch(
      new RegExp(`${keg.code}\\s+\\d{1,2} \\w+ \\d{4}, \\d\\d:\\d\\d\\s+Recorded exception\\s+Recorded as an exception: Sanitize step: 0.9 mL/L`),
    );
    expect(text).toMatch(/Reason given: Last of the sanitizer/);
    expect(text).toMatch(/\[exception\] Sanitize/);
  });

  it('keeps an exception with the database’s guarantee: a reason needs its rules and is never blank', async () => {
    const keg = await dirtyKeg();
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps() });
    const id = res.body.cycle.id;
    await expect(
      ctx.db.updateTable('sanitation_step').set({ exception_reason: 'x' }).where('cycle_id', '=', id).where('step', '=', 'clean').execute(),
    ).rejects.toThrow(/sanitation_step_exception_check/);
    await expect(
      ctx.db
        .updateTable('sanitation_step')
        .set({ exception_reason: '  ', exception_rules: ['strength_low'] })
        .where('cycle_id', '=', id)
        .where('step', '=', 'clean')
        .execute(),
    ).rejects.toThrow(/sanitation_step_exception_check/);
  });
});

describe('the rules in Settings', () => {
  it('round-trips working ranges, caustic flags and the purge minimum; new cycles are judged by them', async () => {
    const got = await brewer.get('/api/settings/sanitation');
    expect(got.status).toBe(200);
    const value = got.body.value;
    expect(value.minimumPurgeSeconds).toBe(20);
    expect(value.chemicals.find((c: { id: string }) => c.id === 'caustic-cleaner')).toMatchObject({ caustic: true, minConcentration: 1, maxConcentration: 3 });
    expect(value.chemicals.find((c: { id: string }) => c.id === 'acid-sanitizer')).toMatchObject({
      caustic: false,
      minConcentration: 1.2,
      maxConcentration: 2,
      minimumContactMinutes: 1,
    });

    // Only the admin writes them; a reversed range is refused and changes nothing.
    expect((await brewer.put('/api/settings/sanitation', value)).status).toBe(403);
    const reversed = structuredClone(value);
    reversed.chemicals[0].minConcentration = 4;
    const bad = await admin.put('/api/settings/sanitation', reversed);
    expect(bad.status).toBe(422);
    expect(bad.body.errors.map((e: { path: string }) => e.path)).toContain('chemicals.0.maxConcentration');
    expect((await brewer.get('/api/settings/sanitation')).body.value).toEqual(value);

    const stricter = structuredClone(value);
    stricter.minimumPurgeSeconds = 45;
    Object.assign(
      stricter.chemicals.find((c: { id: string }) => c.id === 'alkaline-cleaner'),
      { minConcentration: 1.6, defaultConcentration: 2 },
    );
    try {
      const put = await admin.put('/api/settings/sanitation', stricter);
      expect(put.status).toBe(200);
      expect((await brewer.get('/api/settings/sanitation')).body.value).toEqual(stricter);
      const keg = await dirtyKeg();
      const res = await brewer.post('/api/sanitation-cycles', { equipmentId: keg.id, steps: completeSteps() });
      expect(res.status).toBe(422);
      expect(res.body.errors.map((e: { path: string; message: string }) => `${e.path}: ${e.message}`)).toEqual([
        'steps.0.concentration: Clean step: 1.5 % is below the working strength of Alkaline cleaner (oxygen-based powder) (1.6–3 %).',
        "steps.3.contactMinutes: Purge step: a CO2 flush of 30 s is below the co-op's minimum of 45 s.",
      ]);
    } finally {
      expect((await admin.put('/api/settings/sanitation', value)).status).toBe(200);
    }
  });
});
