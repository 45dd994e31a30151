import type PgBoss from 'pg-boss';
import { z } from 'zod';
import { kpaToPsi, lineMaterials, type LineMaterial } from '../../../shared/brewing/index.ts';
import { checkLine, planCarbonation, PlanError } from '../../../shared/cellar/carbonation-planner.ts';
import type { CarbonationSettings } from '../../../shared/schemas/cellar-settings.ts';
import type { CarbonationPlanView, CreateCarbonationPlanInput, LineCheckView, previewCarbonationPlanSchema } from '../../../shared/schemas/carbonation.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { enqueueMail } from '../../lib/mailer.ts';
import { assertInspected } from '../equipment/inspections.service.ts';
import { pressureReminder } from '../mail/templates/pressure-reminder.ts';
import { carbonationSettings, planViews } from './carbonation-queries.service.ts';
import {
  activeBrewers,
  equipmentWithAttributes,
  insertPlan,
  kegAttributes,
  kegTapId,
  lockKeg,
  lockPlan,
  openFillId,
  supersedeActivePlans,
  unremindedPlanIds,
  updatePlan,
} from './carbonation.repository.ts';

export const carbonationReminderQueue = 'cellar.carbonation-reminder';

const round = (v: number, d = 2) => Math.round(v * 10 ** d) / 10 ** d;

type PlanFields = z.infer<typeof previewCarbonationPlanSchema>;

interface Line {
  tapId: string | null;
  lengthM: number;
  insideDiameterMm: number;
  riseM: number;
  material?: LineMaterial | null | undefined;
  resistanceKpaPerM?: number | null | undefined;
}

/** The plan's figures and its line check, from the inputs and the co-op's defaults. */
export function computePlan(input: PlanFields, settings: CarbonationSettings, line: Line | null, now: Date) {
  const temperatureC = input.temperatureC ?? settings.coldRoomTempC;
  const altitudeM = input.altitudeM ?? settings.altitudeM;
  const fastStartPressureKpa = input.method === 'fast_start' ? (input.fastStartPressureKpa ?? settings.fastStartPressureKpa) : undefined;
  const fastStartHours = input.method === 'fast_start' ? (input.fastStartHours ?? settings.fastStartHours) : undefined;
  const settleDays = input.method === 'fast_start' ? (input.settleDays ?? settings.settleDays) : undefined;
  const holdDays = input.holdDays ?? settings.holdDays;
  let result;
  try {
    result = planCarbonation({
      targetVolumes: input.targetVolumes,
      temperatureC,
      altitudeM,
      method: input.method,
      startedAt: input.startedAt ?? now,
      holdDays,
      fastStartPressureKpa,
      fastStartHours,
      settleDays,
      maxPressureKpa: settings.maxPlanPressureKpa,
    });
  } catch (e) {
    if (e instanceof PlanError) throw unprocessable(e.message, [{ path: e.field, message: e.message }]);
    throw e;
  }
  const lineCheck: LineCheckView | null = line
    ? {
        tapId: line.tapId,
        lengthM: line.lengthM,
        insideDiameterMm: line.insideDiameterMm,
        riseM: line.riseM,
        material: line.material ?? null,
        ...checkLine({
          servingPressureKpa: result.servingPressureKpa,
          lengthM: line.lengthM,
          insideDiameterMm: line.insideDiameterMm,
          riseM: line.riseM,
          fixedKpa: settings.lineFixedKpa,
          material: line.material,
          resistanceKpaPerM: line.resistanceKpaPerM ?? undefined,
        }),
      }
    : null;
  return { temperatureC, altitudeM, fastStartPressureKpa, fastStartHours, settleDays, holdDays, result, lineCheck };
}

/** The line to check: one given, else the named tap's, else the tap the keg is on. */
async function resolveLine(db: Database, input: PlanFields): Promise<Line | null> {
  let tapId = input.tapId ?? null;
  if (input.line) {
    // A line given with a tap: the tap's line as checked on screen (another line type or resistance).
    if (tapId) {
      const tap = await equipmentWithAttributes(db, tapId);
      if (!tap || tap.kind !== 'tap') throw unprocessable('That is not a tap position.', [{ path: 'tapId', message: 'Pick a tap position' }]);
    }
    return { tapId, ...input.line };
  }
  if (!tapId && input.kegId) tapId = await kegTapId(db, input.kegId);
  if (!tapId) return null;
  const tap = await equipmentWithAttributes(db, tapId);
  if (!tap || tap.kind !== 'tap') throw unprocessable('That is not a tap position.', [{ path: 'tapId', message: 'Pick a tap position' }]);
  const a = (tap.attributes ?? {}) as Record<string, unknown>;
  if (typeof a.lineLengthM !== 'number' || typeof a.lineInsideDiameterMm !== 'number') return null;
  return {
    tapId: tap.id,
    lengthM: a.lineLengthM,
    insideDiameterMm: a.lineInsideDiameterMm,
    riseM: typeof a.riseM === 'number' ? a.riseM : 0,
    material: (lineMaterials as readonly unknown[]).includes(a.lineMaterial) ? (a.lineMaterial as LineMaterial) : null,
    resistanceKpaPerM: typeof a.lineResistanceKpaPerM === 'number' ? a.lineResistanceKpaPerM : undefined,
  };
}

/** The keg's rated working pressure (kPa gauge) from the registry, null when not recorded. */
async function kegRating(db: Database, kegId: string | undefined): Promise<number | null> {
  if (!kegId) return null;
  const rated = ((await kegAttributes(db, kegId)) as { ratedPressureKpa?: unknown } | null | undefined)?.ratedPressureKpa;
  return typeof rated === 'number' && rated > 0 ? rated : null;
}

/** 422 when the plan would put more on the keg than its rated working pressure (fast start or serving). */
function checkRating(p: ReturnType<typeof computePlan>, ratedKpa: number | null) {
  if (ratedKpa === null) return;
  const asked = [
    { path: 'fastStartPressureKpa', kpa: p.fastStartPressureKpa ?? 0 },
    { path: 'targetVolumes', kpa: p.result.servingPressureKpa },
  ].filter((x) => x.kpa > ratedKpa);
  if (!asked.length) return;
  const psi = (kpa: number) => Math.round(kpaToPsi(kpa));
  const over = asked[0]!;
  const message = `This plan needs ${Math.round(over.kpa)} kPa (${psi(over.kpa)} psi), above the keg's rated working pressure of ${Math.round(ratedKpa)} kPa (${psi(ratedKpa)} psi). Never exceed a keg's rating: choose a lower pressure or another keg.`;
  throw unprocessable(
    message,
    asked.map((a) => ({ path: a.path, message: `Above the keg's rating of ${Math.round(ratedKpa)} kPa` })),
  );
}

export async function previewPlan(db: Database, input: PlanFields, now: Date) {
  const settings = await carbonationSettings(db);
  const line = await resolveLine(db, input);
  const p = computePlan(input, settings, line, now);
  const ratedPressureKpa = await kegRating(db, input.kegId);
  checkRating(p, ratedPressureKpa);
  return {
    servingPressureKpa: round(p.result.servingPressureKpa),
    temperatureC: p.temperatureC,
    altitudeM: p.altitudeM,
    startedAt: p.result.startedAt,
    lowerPressureAt: p.result.lowerPressureAt,
    readyAt: p.result.readyAt,
    fastStartPressureKpa: p.fastStartPressureKpa ?? null,
    fastStartEquilibriumVolumes: p.result.fastStartEquilibriumVolumes,
    warnings: p.result.warnings,
    line: p.lineCheck,
    kegRatedPressureKpa: ratedPressureKpa,
  };
}

export async function createPlan(
  db: Database,
  queue: PgBoss,
  input: CreateCarbonationPlanInput,
  actor: { id: string },
  now: Date,
): Promise<CarbonationPlanView> {
  const settings = await carbonationSettings(db);
  const line = await resolveLine(db, input);
  const p = computePlan(input, settings, line, now);
  const { planId, superseded } = await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, input.kegId);
    if (!keg || keg.kind !== 'keg') throw notFound('Keg');
    if (keg.state !== 'holding') throw conflict(`${keg.code} holds no beer to carbonate.`);
    // A keg past its pressure test, relief-valve check or seal service (or failing one) is not put under pressure.
    await assertInspected(trx, [keg], 'carbonated', now);
    checkRating(p, await kegRating(trx, keg.id));
    const fillId = await openFillId(trx, keg.id);
    const old = await supersedeActivePlans(trx, keg.id, now);
    const planId = await insertPlan(trx, {
      keg_id: keg.id,
      keg_fill_id: fillId,
      method: input.method,
      style_family: input.styleFamily ?? '',
      target_volumes: input.targetVolumes,
      temperature_c: p.temperatureC,
      altitude_m: p.altitudeM,
      serving_pressure_kpa: round(p.result.servingPressureKpa),
      fast_pressure_kpa: p.fastStartPressureKpa ?? null,
      fast_hours: p.fastStartHours ?? null,
      hold_days: input.method === 'set_and_hold' ? p.holdDays : null,
      settle_days: p.settleDays ?? null,
      started_at: p.result.startedAt,
      lower_pressure_at: p.result.lowerPressureAt,
      ready_at: p.result.readyAt,
      tap_id: p.lineCheck?.tapId ?? null,
      line_length_m: p.lineCheck?.lengthM ?? null,
      line_inside_diameter_mm: p.lineCheck?.insideDiameterMm ?? null,
      line_rise_m: p.lineCheck?.riseM ?? null,
      line_material: p.lineCheck?.material ?? null,
      line_resistance_kpa_per_m:
        p.lineCheck?.resistanceKpaPerM !== null && p.lineCheck?.resistanceKpaPerM !== undefined ? round(p.lineCheck.resistanceKpaPerM) : null,
      line_balanced_length_m: p.lineCheck?.balancedLengthM !== null && p.lineCheck?.balancedLengthM !== undefined ? round(p.lineCheck.balancedLengthM) : null,
      notes: input.notes ?? '',
      created_by: actor.id,
      created_at: now,
      updated_at: now,
    });
    await audit(trx, actor.id, 'created', 'CarbonationPlan', planId, {
      kegId: keg.id,
      code: keg.code,
      method: input.method,
      targetVolumes: input.targetVolumes,
      servingPressureKpa: round(p.result.servingPressureKpa),
    });
    return { planId, superseded: old };
  });

  // Reminders live in the queue; a superseded plan's reminder is withdrawn. The queue counts its own
  // time, so the reminder waits as long as the clock says is left (none if it is already due).
  for (const o of superseded) if (o.reminder_job_id) await queue.cancel(carbonationReminderQueue, o.reminder_job_id).catch(() => undefined);
  if (p.result.lowerPressureAt) {
    const waitSeconds = Math.max(0, Math.ceil((new Date(p.result.lowerPressureAt).getTime() - now.getTime()) / 1000));
    const jobId = await queue.sendAfter(carbonationReminderQueue, { planId }, { singletonKey: planId, retryLimit: 5, retryDelay: 30 }, waitSeconds);
    if (jobId) await updatePlan(db, planId, { reminder_job_id: jobId });
  }
  const [view] = await planViews(db, [planId]);
  return view!;
}

export async function markPressureLowered(db: Database, queue: PgBoss, planId: string, actor: { id: string }, now: Date) {
  const row = await db.transaction().execute(async (trx) => {
    const plan = await lockPlan(trx, planId);
    if (!plan) throw notFound('Carbonation plan');
    if (plan.state !== 'active') throw conflict('This plan is no longer active.');
    if (plan.method !== 'fast_start') throw conflict('Only a fast start has a pressure to lower.');
    if (plan.pressure_lowered_at) throw conflict('The pressure was already lowered.');
    await updatePlan(trx, planId, { pressure_lowered_at: now, updated_at: now });
    await audit(trx, actor.id, 'pressure_lowered', 'CarbonationPlan', planId, {});
    return plan;
  });
  if (row.reminder_job_id) await queue.cancel(carbonationReminderQueue, row.reminder_job_id).catch(() => undefined);
}

export async function setPlanState(db: Database, queue: PgBoss, planId: string, state: 'done' | 'cancelled', actor: { id: string }, now: Date) {
  const row = await db.transaction().execute(async (trx) => {
    const plan = await lockPlan(trx, planId);
    if (!plan) throw notFound('Carbonation plan');
    if (plan.state !== 'active') throw conflict('This plan is no longer active.');
    await updatePlan(trx, planId, { state, updated_at: now });
    await audit(trx, actor.id, state === 'done' ? 'completed' : 'cancelled', 'CarbonationPlan', planId, {});
    return plan;
  });
  if (row.reminder_job_id) await queue.cancel(carbonationReminderQueue, row.reminder_job_id).catch(() => undefined);
}

/**
 * The queued reminder at the end of a fast start: e-mails every brewer on duty to turn the
 * regulator down, once, unless the plan was finished, replaced or the pressure already lowered.
 */
export async function sendLowerPressureReminder(db: Database, queue: PgBoss, planId: string, now: Date): Promise<boolean> {
  const claimed = await db.transaction().execute(async (trx) => {
    const plan = await lockPlan(trx, planId);
    if (!plan || plan.state !== 'active' || plan.method !== 'fast_start' || plan.pressure_lowered_at || plan.reminder_sent_at) return null;
    await updatePlan(trx, planId, { reminder_sent_at: now });
    await audit(trx, null, 'reminded', 'CarbonationPlan', planId, { code: plan.code });
    return plan;
  });
  if (!claimed) return false;
  for (const b of await activeBrewers(db)) {
    const mail = pressureReminder({
      recipientName: b.name,
      kegCode: claimed.code,
      tapCode: claimed.tap_code,
      fastPressureKpa: Number(claimed.fast_pressure_kpa),
      servingPressureKpa: Number(claimed.serving_pressure_kpa),
    });
    await enqueueMail(queue, { to: b.email, ...mail });
  }
  return true;
}

/** Reminders due by now that were never sent (their job lost, or the plan seeded): sent once each. */
export async function sendDueReminders(db: Database, queue: PgBoss, now: Date): Promise<number> {
  const due = await unremindedPlanIds(db, new Date(now.getTime() - 5 * 60_000));
  let sent = 0;
  for (const id of due) if (await sendLowerPressureReminder(db, queue, id, now)) sent += 1;
  return sent;
}
