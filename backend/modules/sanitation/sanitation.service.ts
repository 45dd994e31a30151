import { checkSteps, evaluateCycle, outcomeReason, type CycleEvaluation, type StepForRules } from '../../../shared/cellar/sanitation-rules.ts';
import type { SanitationSettings } from '../../../shared/schemas/cellar-settings.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type {
  CreateSanitationCycleInput,
  SanitationCycleListQuery,
  SanitationCycleView,
  SanitationStepInput,
  VesselSanitationStatus,
} from '../../../shared/schemas/sanitation.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { pageOfViews } from '../../lib/paginate.ts';
import { drawCo2, purgeGrams } from '../equipment/cylinders.service.ts';
import { getSetting } from '../settings/settings.service.ts';
import { setVesselState } from '../equipment/vessel-state.ts';
import {
  activePeople,
  cycleFields,
  cyclePage,
  cycleRows,
  equipmentKinds,
  insertCycle,
  latestCycleId,
  lockCycle,
  lockVessel,
  replaceSteps,
  stepsOf,
  stepRows,
  updateCycle,
  vesselStateRow,
  vesselStatusPage,
  type CycleRow,
  type VesselStatusQuery,
} from './sanitation.repository.ts';

export { stepRows } from './sanitation.repository.ts';

/** A step may be recorded a little ahead of the server clock (phones drift), not more. */
const FUTURE_SLACK_MS = 10 * 60_000;

export async function sanitationSettings(db: Database): Promise<SanitationSettings> {
  return (await getSetting(db, 'sanitation')).value;
}

/**
 * Refuses (422, nothing written) steps that break the co-op's rules (shared/cellar/sanitation-rules.ts
 * `checkSteps`) unless the rule is exceptable and the step gives a reason; and a reason on a step that
 * breaks no rule. Only steps from `firstNew` on are judged (the earlier ones of a continued cycle were
 * judged when recorded), except that their contact times must still fit before the new steps.
 */
export function assertStepsChecked(steps: readonly StepForRules[], settings: SanitationSettings, firstNew = 0): void {
  const violations = checkSteps(steps, settings).filter((v) => v.index >= firstNew || v.rule === 'contact_exceeds_gap');
  const blocking = violations.filter((v) => !v.exceptable || !steps[v.index]!.exceptionReason?.trim());
  const errors = blocking.map((v) => ({ path: `steps.${v.index - firstNew}.${v.field}`, message: v.message }));
  steps.forEach((s, i) => {
    if (i >= firstNew && s.exceptionReason?.trim() && !violations.some((v) => v.index === i)) {
      errors.push({
        path: `steps.${i - firstNew}.exceptionReason`,
        message: `${s.step[0]!.toUpperCase()}${s.step.slice(1)} step: it breaks no rule, so it needs no exception; leave the reason out.`,
      });
    }
  });
  if (errors.length) {
    const first = blocking[0];
    throw unprocessable(
      first ? `${first.message}${first.exceptable ? ' Correct it, or record the step as an exception with a reason.' : ''}` : errors[0]!.message,
      errors,
    );
  }
}

/** A push-out purge's second keg must be a keg, and not the vessel being cleaned. */
async function assertPushOutKegs(db: Database, steps: readonly SanitationStepInput[], vesselId: string, firstNew = 0): Promise<void> {
  const ids = [...new Set(steps.map((s) => s.pushedIntoEquipmentId).filter((v): v is string => Boolean(v)))];
  if (!ids.length) return;
  const found = await equipmentKinds(db, ids);
  const kegs = new Set(found.filter((r) => r.kind === 'keg').map((r) => r.id));
  steps.forEach((s, i) => {
    if (!s.pushedIntoEquipmentId) return;
    const path = `steps.${i - firstNew}.pushedIntoEquipmentId`;
    if (s.purgeMethod !== 'push_out') throw unprocessable('Only a push-out purge names a second keg.', [{ path, message: 'Only for a push-out purge' }]);
    if (!kegs.has(s.pushedIntoEquipmentId))
      throw unprocessable('Purge step: the keg it was pushed into is not a keg the co-op has.', [{ path, message: 'No keg with this id' }]);
    if (s.pushedIntoEquipmentId === vesselId) throw unprocessable('Purge step: a keg cannot be pushed into itself.', [{ path, message: 'Pick another keg' }]);
  });
}

/** A step may be recorded a little ahead of the clock, not more (422). */
function assertNotFuture(steps: readonly { at: string }[], now: Date): void {
  const latestAllowed = now.getTime() + FUTURE_SLACK_MS;
  steps.forEach((s, i) => {
    if (new Date(s.at).getTime() > latestAllowed) {
      throw unprocessable('A step cannot be recorded in the future.', [{ path: `steps.${i}.at`, message: 'This time is in the future' }]);
    }
  });
}

/**
 * What every recorded cycle writes besides its own row: its steps, the CO2 its purges drew (`newSteps`),
 * and the vessel's state from the outcome.
 */
async function writeCycleEffects(
  trx: Database,
  cycleId: string,
  vesselId: string,
  ev: CycleEvaluation,
  steps: { all: readonly SanitationStepInput[]; added: readonly SanitationStepInput[] },
  settings: SanitationSettings,
  actorId: string,
  now: Date,
): Promise<void> {
  await replaceSteps(trx, cycleId, stepRows(cycleId, ev, steps.all, settings, actorId));
  await drawCo2(trx, { grams: purgeGrams(steps.added, settings.co2GramsPerPurge), sourceType: 'sanitation_cycle', sourceId: cycleId, actorId, at: now, now });
  await setVesselState(trx, vesselId, ev.outcome, outcomeReason(ev, settings.freshnessDays), actorId, now);
}

/** A cycle as the API shows it, with its vessel's state now. */
async function cycleResult(db: Database, cycleId: string, equipmentId: string) {
  const [cycle] = await cycleViews(db, [cycleId]);
  return { cycle: cycle!, equipment: await vesselStateRow(db, equipmentId) };
}

const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/** Records a cycle and sets the vessel's state from it, in one transaction. */
export async function recordCycle(
  db: Database,
  input: CreateSanitationCycleInput,
  actor: { id: string },
  now: Date,
): Promise<{ cycle: SanitationCycleView; equipment: { id: string; code: string; state: string } }> {
  const settings = await sanitationSettings(db);
  assertNotFuture(input.steps, now);
  const people = [...new Set(input.steps.map((s) => s.performedBy).filter((v): v is string => Boolean(v)))];
  if (people.length) {
    const known = new Set(await activePeople(db, people));
    const bad = input.steps.findIndex((s) => s.performedBy && !known.has(s.performedBy));
    if (bad >= 0) throw unprocessable('Unknown person on a step.', [{ path: `steps.${bad}.performedBy`, message: 'No active person with this id' }]);
  }
  assertStepsChecked(input.steps, settings);
  await assertPushOutKegs(db, input.steps, input.equipmentId);
  const ev = evaluateCycle(input.steps, settings);

  const cycleId = await db.transaction().execute(async (trx) => {
    const vessel = await lockVessel(trx, input.equipmentId);
    if (!vessel) throw notFound('Vessel');
    if (vessel.kind !== 'fermenter' && vessel.kind !== 'keg') {
      throw unprocessable('Only fermenters and kegs have sanitation cycles.', [{ path: 'equipmentId', message: 'Pick a fermenter or a keg' }]);
    }
    if (vessel.state === 'holding') throw conflict(`${vessel.code} holds beer: empty it before cleaning it.`, { state: vessel.state });
    if (vessel.state === 'out_of_service') throw conflict(`${vessel.code} is out of service.`, { state: vessel.state });

    const cycleId = await insertCycle(trx, { equipment_id: vessel.id, ...cycleFields(ev, settings), recorded_by: actor.id, notes: input.notes ?? '' });
    await writeCycleEffects(trx, cycleId, vessel.id, ev, { all: input.steps, added: input.steps }, settings, actor.id, now);
    await audit(trx, actor.id, 'recorded', 'SanitationCycle', cycleId, {
      equipmentId: vessel.id,
      code: vessel.code,
      outcome: ev.outcome,
      issues: ev.issues.map((i) => i.code),
    });
    return cycleId;
  });
  return cycleResult(db, cycleId, input.equipmentId);
}

/**
 * Adds steps to a vessel's latest cycle while it is incomplete and the vessel has not been used
 * since (cleaned and rinsed today, sanitized and purged tomorrow): the whole cycle is evaluated
 * again and the vessel's state follows it.
 */
export async function continueCycle(
  db: Database,
  cycleId: string,
  input: { steps: CreateSanitationCycleInput['steps']; notes?: string | undefined },
  actor: { id: string },
  now: Date,
): Promise<{ cycle: SanitationCycleView; equipment: { id: string; code: string; state: string } }> {
  const settings = await sanitationSettings(db);
  assertNotFuture(input.steps, now);
  const equipmentId = await db.transaction().execute(async (trx) => {
    const cycle = await lockCycle(trx, cycleId);
    if (!cycle) throw notFound('Sanitation cycle');
    const vessel = (await lockVessel(trx, cycle.equipment_id))!;
    if (cycle.complete) throw conflict('This cycle is already complete; record a new one.');
    const latestId = await latestCycleId(trx, vessel.id);
    if (latestId !== cycle.id) throw conflict('A later cycle was recorded for this vessel; continue that one.');
    if (vessel.state !== cycle.outcome)
      throw conflict(`${vessel.code} has changed since this cycle (now ${vessel.state.replace('_', ' ')}); record a new cycle.`);
    const old = await stepsOf(trx, cycle.id);
    const merged = [
      ...old.map((o) => ({
        step: o.step,
        chemical: o.chemical ?? undefined,
        concentration: o.concentration === null ? undefined : Number(o.concentration),
        contactMinutes: o.contact_minutes === null ? undefined : Number(o.contact_minutes),
        at: o.at.toISOString(),
        purgeMethod: o.purge_method ?? undefined,
        co2Grams: o.co2_grams === null ? undefined : Number(o.co2_grams),
        solutionLiters: o.solution_liters === null ? undefined : Number(o.solution_liters),
        performedBy: o.performed_by ?? undefined,
        note: o.note,
        pushedIntoEquipmentId: o.pushed_into_equipment_id ?? undefined,
        vented: o.vented ?? undefined,
        exceptionReason: o.exception_reason ?? undefined,
      })),
      ...input.steps,
    ];
    assertStepsChecked(merged, settings, old.length);
    await assertPushOutKegs(trx, merged, vessel.id, old.length);
    const ev = evaluateCycle(merged, settings);
    await updateCycle(trx, cycle.id, {
      ...cycleFields(ev, settings),
      notes: input.notes ? [cycle.notes, input.notes].filter(Boolean).join('\n') : cycle.notes,
    });
    await writeCycleEffects(trx, cycle.id, vessel.id, ev, { all: merged, added: input.steps }, settings, actor.id, now);
    await audit(trx, actor.id, 'continued', 'SanitationCycle', cycle.id, {
      equipmentId: vessel.id,
      code: vessel.code,
      outcome: ev.outcome,
      added: input.steps.map((s) => s.step),
    });
    return vessel.id;
  });
  return cycleResult(db, cycleId, equipmentId);
}

function toView(r: CycleRow): SanitationCycleView {
  return {
    id: r.id,
    equipment: { id: r.equipment_id, code: r.code, name: r.name, kind: r.kind as 'fermenter' | 'keg' },
    outcome: r.outcome,
    complete: r.complete,
    issues: (Array.isArray(r.issues) ? r.issues : []) as SanitationCycleView['issues'],
    startedAt: r.started_at.toISOString(),
    completedAt: r.completed_at.toISOString(),
    freshUntil: iso(r.fresh_until),
    recordedBy: r.recorded_by ? { id: r.recorded_by, name: r.recorded_by_name ?? '' } : null,
    notes: r.notes,
    createdAt: r.created_at.toISOString(),
    steps: r.steps.map((s) => ({
      step: s.step,
      chemicalId: s.chemical_id,
      chemical: s.chemical,
      concentration: num(s.concentration),
      concentrationUnit: s.concentration_unit,
      contactMinutes: num(s.contact_minutes),
      minimumContactMinutes: num(s.minimum_contact_minutes),
      purgeMethod: s.purge_method,
      co2Grams: num(s.co2_grams),
      solutionLiters: num(s.solution_liters),
      at: new Date(s.at).toISOString(),
      performedBy: s.performed_by ? { id: s.performed_by, name: s.performed_by_name ?? '' } : null,
      ok: s.ok,
      note: s.note,
      exceptionReason: s.exception_reason,
      exceptionRules: s.exception_rules ?? [],
      vented: s.vented,
      pushedInto: s.pushed_into_equipment_id ? { id: s.pushed_into_equipment_id, code: s.pushed_into_code ?? '' } : null,
    })),
  };
}

export async function cycleViews(db: Database, ids: string[]): Promise<SanitationCycleView[]> {
  if (!ids.length) return [];
  const rows = await cycleRows(db, ids);
  const byId = new Map(rows.map((r) => [r.id, toView(r)]));
  return ids.map((id) => byId.get(id)).filter((v): v is SanitationCycleView => Boolean(v));
}

/** A date-only bound means the whole day (to: up to the end of that day, UTC). */
export function boundFrom(v: string): Date {
  return new Date(v.length === 10 ? `${v}T00:00:00Z` : v);
}
export function boundTo(v: string): Date {
  return v.length === 10 ? new Date(new Date(`${v}T00:00:00Z`).getTime() + 86_400_000) : new Date(v);
}

export async function listCycles(db: Database, q: SanitationCycleListQuery): Promise<Page<SanitationCycleView>> {
  const range = { ...(q.from ? { from: boundFrom(q.from) } : {}), ...(q.to ? { to: boundTo(q.to) } : {}) };
  return pageOfViews(await cyclePage(db, q, range), (ids) => cycleViews(db, ids), q);
}

/** Every fermenter and keg with its sanitation standing, lapses applied. */
export async function listVesselStatus(db: Database, q: VesselStatusQuery, now: Date): Promise<Page<VesselSanitationStatus>> {
  const { rows, total, last } = await vesselStatusPage(db, q, now);
  const lastById = new Map(last.map((c) => [c.id, c]));
  return {
    items: rows.map((r) => {
      const lc = r.last_cycle_id ? lastById.get(r.last_cycle_id) : undefined;
      return {
        id: r.id,
        code: r.code,
        name: r.name,
        kind: r.kind as 'fermenter' | 'keg',
        state: r.effective_state,
        storedState: r.state,
        stateReason: r.lapsed ? `Freshness window lapsed at ${iso(r.fresh_until)}` : (r.state_reason ?? null),
        lastCycle: lc ? { id: lc.id, outcome: lc.outcome, completedAt: lc.completed_at.toISOString(), freshUntil: iso(lc.fresh_until) } : null,
        freshUntil: iso(r.fresh_until),
      };
    }),
    total,
    page: q.page,
    pageSize: q.pageSize,
  };
}
