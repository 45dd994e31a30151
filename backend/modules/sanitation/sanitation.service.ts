import { sql } from 'kysely';
import { jsonArrayFrom } from 'kysely/helpers/postgres';
import { checkSteps, evaluateCycle, outcomeReason, type CycleEvaluation, type StepForRules } from '../../../shared/cellar/sanitation-rules.ts';
import type { SanitationSettings } from '../../../shared/schemas/cellar-settings.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type {
  CreateSanitationCycleInput,
  SanitationCycleListQuery,
  SanitationCycleView,
  SanitationStepInput,
  SanitationStepView,
  VesselSanitationStatus,
} from '../../../shared/schemas/sanitation.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { drawCo2, purgeGrams } from '../equipment/cylinders.service.ts';
import { getSetting } from '../settings/settings.service.ts';
import { effectiveStateSql, freshUntilSql, lapsedSql, setVesselState } from '../equipment/vessel-state.ts';

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
  const found = await db.selectFrom('equipment').select(['id', 'kind']).where('id', 'in', ids).execute();
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
  const latestAllowed = now.getTime() + FUTURE_SLACK_MS;
  input.steps.forEach((s, i) => {
    if (new Date(s.at).getTime() > latestAllowed) {
      throw unprocessable('A step cannot be recorded in the future.', [{ path: `steps.${i}.at`, message: 'This time is in the future' }]);
    }
  });
  const people = [...new Set(input.steps.map((s) => s.performedBy).filter((v): v is string => Boolean(v)))];
  if (people.length) {
    const found = await db.selectFrom('app_user').select('id').where('id', 'in', people).where('is_active', '=', true).execute();
    const known = new Set(found.map((r) => r.id));
    const bad = input.steps.findIndex((s) => s.performedBy && !known.has(s.performedBy));
    if (bad >= 0) throw unprocessable('Unknown person on a step.', [{ path: `steps.${bad}.performedBy`, message: 'No active person with this id' }]);
  }
  assertStepsChecked(input.steps, settings);
  await assertPushOutKegs(db, input.steps, input.equipmentId);
  const ev = evaluateCycle(input.steps, settings);

  const cycleId = await db.transaction().execute(async (trx) => {
    const vessel = await trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state']).where('id', '=', input.equipmentId).forUpdate().executeTakeFirst();
    if (!vessel) throw notFound('Vessel');
    if (vessel.kind !== 'fermenter' && vessel.kind !== 'keg') {
      throw unprocessable('Only fermenters and kegs have sanitation cycles.', [{ path: 'equipmentId', message: 'Pick a fermenter or a keg' }]);
    }
    if (vessel.state === 'holding') throw conflict(`${vessel.code} holds beer: empty it before cleaning it.`, { state: vessel.state });
    if (vessel.state === 'out_of_service') throw conflict(`${vessel.code} is out of service.`, { state: vessel.state });

    const cycle = await trx
      .insertInto('sanitation_cycle')
      .values({
        equipment_id: vessel.id,
        started_at: ev.startedAt,
        completed_at: ev.completedAt,
        outcome: ev.outcome,
        complete: ev.complete,
        issues: JSON.stringify(ev.issues),
        freshness_days: ev.complete ? settings.freshnessDays : null,
        fresh_until: ev.freshUntil,
        recorded_by: actor.id,
        notes: input.notes ?? '',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await trx
      .insertInto('sanitation_step')
      .values(stepRows(cycle.id, ev, input.steps, settings, actor.id))
      .execute();
    await drawCo2(trx, {
      grams: purgeGrams(input.steps, settings.co2GramsPerPurge),
      sourceType: 'sanitation_cycle',
      sourceId: cycle.id,
      actorId: actor.id,
      at: now,
      now,
    });
    await setVesselState(trx, vessel.id, ev.outcome, outcomeReason(ev, settings.freshnessDays), actor.id, now);
    await audit(trx, actor.id, 'recorded', 'SanitationCycle', cycle.id, {
      equipmentId: vessel.id,
      code: vessel.code,
      outcome: ev.outcome,
      issues: ev.issues.map((i) => i.code),
    });
    return cycle.id;
  });

  const [cycle] = await cycleViews(db, [cycleId]);
  const equipment = await db.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', input.equipmentId).executeTakeFirstOrThrow();
  return { cycle: cycle!, equipment };
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
  const latestAllowed = now.getTime() + FUTURE_SLACK_MS;
  input.steps.forEach((s, i) => {
    if (new Date(s.at).getTime() > latestAllowed) {
      throw unprocessable('A step cannot be recorded in the future.', [{ path: `steps.${i}.at`, message: 'This time is in the future' }]);
    }
  });
  const equipmentId = await db.transaction().execute(async (trx) => {
    const cycle = await trx.selectFrom('sanitation_cycle').selectAll().where('id', '=', cycleId).forUpdate().executeTakeFirst();
    if (!cycle) throw notFound('Sanitation cycle');
    const vessel = await trx.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', cycle.equipment_id).forUpdate().executeTakeFirstOrThrow();
    if (cycle.complete) throw conflict('This cycle is already complete; record a new one.');
    const latest = await trx
      .selectFrom('sanitation_cycle')
      .select('id')
      .where('equipment_id', '=', vessel.id)
      .orderBy('completed_at', 'desc')
      .orderBy('created_at', 'desc')
      .limit(1)
      .executeTakeFirstOrThrow();
    if (latest.id !== cycle.id) throw conflict('A later cycle was recorded for this vessel; continue that one.');
    if (vessel.state !== cycle.outcome)
      throw conflict(`${vessel.code} has changed since this cycle (now ${vessel.state.replace('_', ' ')}); record a new cycle.`);
    const old = await trx.selectFrom('sanitation_step').selectAll().where('cycle_id', '=', cycle.id).orderBy('position').execute();
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
    await trx
      .updateTable('sanitation_cycle')
      .set({
        started_at: ev.startedAt,
        completed_at: ev.completedAt,
        outcome: ev.outcome,
        complete: ev.complete,
        issues: JSON.stringify(ev.issues),
        freshness_days: ev.complete ? settings.freshnessDays : null,
        fresh_until: ev.freshUntil,
        notes: input.notes ? [cycle.notes, input.notes].filter(Boolean).join('\n') : cycle.notes,
      })
      .where('id', '=', cycle.id)
      .execute();
    await trx.deleteFrom('sanitation_step').where('cycle_id', '=', cycle.id).execute();
    await trx
      .insertInto('sanitation_step')
      .values(stepRows(cycle.id, ev, merged, settings, actor.id))
      .execute();
    await drawCo2(trx, {
      grams: purgeGrams(input.steps, settings.co2GramsPerPurge),
      sourceType: 'sanitation_cycle',
      sourceId: cycle.id,
      actorId: actor.id,
      at: now,
      now,
    });
    await setVesselState(trx, vessel.id, ev.outcome, outcomeReason(ev, settings.freshnessDays), actor.id, now);
    await audit(trx, actor.id, 'continued', 'SanitationCycle', cycle.id, {
      equipmentId: vessel.id,
      code: vessel.code,
      outcome: ev.outcome,
      added: input.steps.map((s) => s.step),
    });
    return vessel.id;
  });
  const [cycle] = await cycleViews(db, [cycleId]);
  const equipment = await db.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', equipmentId).executeTakeFirstOrThrow();
  return { cycle: cycle!, equipment };
}

type CycleRow = {
  id: string;
  equipment_id: string;
  code: string;
  name: string;
  kind: string;
  outcome: 'ready' | 'cleaned' | 'needs_cleaning';
  complete: boolean;
  issues: unknown;
  started_at: Date;
  completed_at: Date;
  fresh_until: Date | null;
  recorded_by: string | null;
  recorded_by_name: string | null;
  notes: string;
  created_at: Date;
  steps: {
    step: SanitationStepView['step'];
    chemical_id: string | null;
    chemical: string | null;
    concentration: number | string | null;
    concentration_unit: SanitationStepView['concentrationUnit'];
    contact_minutes: number | string | null;
    minimum_contact_minutes: number | string | null;
    purge_method: 'flush' | 'push_out' | null;
    co2_grams: number | string | null;
    solution_liters: number | string | null;
    at: string;
    performed_by: string | null;
    performed_by_name: string | null;
    ok: boolean;
    note: string;
    exception_reason: string | null;
    exception_rules: string[] | null;
    vented: boolean | null;
    pushed_into_equipment_id: string | null;
    pushed_into_code: string | null;
  }[];
};

function cycleQuery(db: Database) {
  return db
    .selectFrom('sanitation_cycle as c')
    .innerJoin('equipment as e', 'e.id', 'c.equipment_id')
    .leftJoin('app_user as r', 'r.id', 'c.recorded_by')
    .select((eb) => [
      'c.id',
      'c.equipment_id',
      'e.code',
      'e.name',
      'e.kind',
      'c.outcome',
      'c.complete',
      'c.issues',
      'c.started_at',
      'c.completed_at',
      'c.fresh_until',
      'c.recorded_by',
      'r.name as recorded_by_name',
      'c.notes',
      'c.created_at',
      jsonArrayFrom(
        eb
          .selectFrom('sanitation_step as s')
          .leftJoin('app_user as p', 'p.id', 's.performed_by')
          .leftJoin('equipment as pk', 'pk.id', 's.pushed_into_equipment_id')
          .select([
            's.step',
            's.chemical_id',
            's.chemical',
            's.concentration',
            's.concentration_unit',
            's.contact_minutes',
            's.minimum_contact_minutes',
            's.purge_method',
            's.co2_grams',
            's.solution_liters',
            's.at',
            's.performed_by',
            'p.name as performed_by_name',
            's.ok',
            's.note',
            's.exception_reason',
            's.exception_rules',
            's.vented',
            's.pushed_into_equipment_id',
            'pk.code as pushed_into_code',
          ])
          .whereRef('s.cycle_id', '=', 'c.id')
          .orderBy('s.position'),
      ).as('steps'),
    ]);
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
  const rows = (await cycleQuery(db).where('c.id', 'in', ids).execute()) as unknown as CycleRow[];
  const byId = new Map(rows.map((r) => [r.id, toView(r)]));
  return ids.map((id) => byId.get(id)).filter((v): v is SanitationCycleView => Boolean(v));
}

const cycleSort = {
  completedAt: 'c.completed_at',
  startedAt: 'c.started_at',
  equipmentCode: 'e.code',
  outcome: 'c.outcome',
} as const;

/** A date-only bound means the whole day (to: up to the end of that day, UTC). */
export function boundFrom(v: string): Date {
  return new Date(v.length === 10 ? `${v}T00:00:00Z` : v);
}
export function boundTo(v: string): Date {
  return v.length === 10 ? new Date(new Date(`${v}T00:00:00Z`).getTime() + 86_400_000) : new Date(v);
}

export async function listCycles(db: Database, q: SanitationCycleListQuery): Promise<Page<SanitationCycleView>> {
  let base = db.selectFrom('sanitation_cycle as c').innerJoin('equipment as e', 'e.id', 'c.equipment_id');
  if (q.equipmentId) base = base.where('c.equipment_id', '=', q.equipmentId);
  if (q.kind) base = base.where('e.kind', '=', q.kind);
  if (q.outcome) base = base.where('c.outcome', '=', q.outcome);
  if (q.from) base = base.where('c.completed_at', '>=', boundFrom(q.from));
  if (q.to) base = base.where('c.completed_at', '<', boundTo(q.to));
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base = base.where((eb) => eb.or([eb('e.code', 'ilike', like), eb('e.name', 'ilike', like)]));
  }
  const [{ total }, page] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
    base
      .select('c.id')
      .orderBy(cycleSort[q.sort], q.order)
      .orderBy('c.id')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  return {
    items: await cycleViews(
      db,
      page.map((r) => r.id),
    ),
    total,
    page: q.page,
    pageSize: q.pageSize,
  };
}

const statusSortColumn = { code: 'code', state: 'effective_state', freshUntil: 'fresh_until', lastCycleAt: 'last_cycle_at' } as const;

/** Every fermenter and keg with its sanitation standing, lapses applied. */
export async function listVesselStatus(
  db: Database,
  q: {
    kind?: 'fermenter' | 'keg' | undefined;
    state?: string | undefined;
    q?: string | undefined;
    sort: keyof typeof statusSortColumn;
    order: 'asc' | 'desc';
    page: number;
    pageSize: number;
  },
  now: Date,
): Promise<Page<VesselSanitationStatus>> {
  const inner = db
    .selectFrom('equipment as e')
    .where('e.kind', 'in', ['fermenter', 'keg'])
    .select((eb) => [
      'e.id',
      'e.code',
      'e.name',
      'e.kind',
      'e.state',
      effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now).as('effective_state'),
      lapsedSql(eb.ref('e.id'), eb.ref('e.state'), now).as('lapsed'),
      freshUntilSql(eb.ref('e.id')).as('fresh_until'),
      eb
        .selectFrom('equipment_state_change as sc')
        .select('sc.reason')
        .whereRef('sc.equipment_id', '=', 'e.id')
        .orderBy('sc.at', 'desc')
        .orderBy('sc.id', 'desc')
        .limit(1)
        .as('state_reason'),
      sql<string | null>`(select lc.id::text from sanitation_cycle lc where lc.equipment_id = e.id order by lc.completed_at desc limit 1)`.as('last_cycle_id'),
      sql<Date | null>`(select max(lc.completed_at) from sanitation_cycle lc where lc.equipment_id = e.id)`.as('last_cycle_at'),
    ]);
  let base = db.selectFrom(inner.as('v')).selectAll('v');
  if (q.kind) base = base.where('v.kind', '=', q.kind);
  if (q.state) base = base.where('v.effective_state', '=', q.state as never);
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base = base.where((eb) => eb.or([eb('v.code', 'ilike', like), eb('v.name', 'ilike', like)]));
  }
  const sortRef = sql.ref(`v.${statusSortColumn[q.sort]}`);
  const [{ total }, rows] = await Promise.all([
    db
      .selectFrom(base.as('b'))
      .select((eb) => eb.fn.countAll<number>().as('total'))
      .executeTakeFirstOrThrow(),
    base
      .orderBy(sql`${sortRef} ${sql.raw(q.order)} nulls last`)
      .orderBy('v.code')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  const lastIds = rows.map((r) => r.last_cycle_id).filter((v): v is string => Boolean(v));
  const last = lastIds.length
    ? await db.selectFrom('sanitation_cycle').select(['id', 'outcome', 'completed_at', 'fresh_until']).where('id', 'in', lastIds).execute()
    : [];
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

/** The rows of a cycle's steps, as the co-op's rules judged them (`ev`), from the steps as entered (`raw`). */
export function stepRows(cycleId: string, ev: CycleEvaluation, raw: readonly SanitationStepInput[], settings: SanitationSettings, actorId: string | null) {
  return ev.steps.map((st, position) => {
    const entered = raw[st.index]!;
    return {
      cycle_id: cycleId,
      position,
      step: st.step,
      chemical_id: st.chemicalId,
      chemical: st.chemicalName,
      concentration: st.concentration,
      concentration_unit: st.concentrationUnit,
      contact_minutes: entered.contactMinutes ?? null,
      minimum_contact_minutes: st.minimumContactMinutes,
      purge_method: st.step === 'purge' ? (entered.purgeMethod ?? 'flush') : null,
      co2_grams: st.step === 'purge' ? (entered.co2Grams ?? settings.co2GramsPerPurge) : null,
      solution_liters: entered.solutionLiters ?? null,
      performed_by: entered.performedBy ?? actorId,
      at: entered.at,
      ok: st.ok,
      note: entered.note ?? '',
      exception_reason: st.exception ? st.exception.reason : null,
      exception_rules: st.exception ? st.exception.rules : [],
      vented: st.step === 'clean' ? (entered.vented ?? null) : null,
      pushed_into_equipment_id: st.step === 'purge' && entered.purgeMethod === 'push_out' ? (entered.pushedIntoEquipmentId ?? null) : null,
    };
  });
}
