import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { SanitationCycleTable, SanitationStepTable } from '../../backend/db/tables/cellar-operations.ts';
import { cycleFields, lockVessel, stepRows as buildStepRows } from '../../backend/modules/sanitation/sanitation.repository.ts';
import { sanitationSettings } from '../../backend/modules/sanitation/sanitation.service.ts';
import { writeStateChange } from '../../backend/modules/equipment/vessel-state.ts';
import { blockingViolations, evaluateCycle, outcomeReason, type CycleEvaluation } from '../../shared/cellar/sanitation-rules.ts';
import type { SanitationStepInput } from '../../shared/schemas/sanitation.ts';
import { type At, inTransaction, MINUTE, toDate } from './common.ts';

export type SanitationCycleRow = Selectable<SanitationCycleTable>;
export type SanitationStepRow = Selectable<SanitationStepTable>;

/**
 * The four steps of a cycle that meets the co-op's default rules (clean 60 min, rinse, sanitize
 * 2 min, purge), the purge at `readyAt`; with `until: 'cleaned'` only the clean and the rinse,
 * the rinse at `readyAt`.
 */
export function cycleSteps(readyAt: At, o: { until?: 'ready' | 'cleaned'; performedBy?: string } = {}): SanitationStepInput[] {
  const end = toDate(readyAt, 'readyAt').getTime();
  const at = (minutesBefore: number) => new Date(end - minutesBefore * MINUTE).toISOString();
  const by = o.performedBy ? { performedBy: o.performedBy } : {};
  if (o.until === 'cleaned') {
    return [
      { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: at(65), ...by },
      { step: 'rinse', at: at(0), ...by },
    ] as SanitationStepInput[];
  }
  return [
    { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: at(80), ...by },
    { step: 'rinse', at: at(15), ...by },
    { step: 'sanitize', chemical: 'acid-sanitizer', concentration: 1.6, contactMinutes: 2, at: at(5), ...by },
    { step: 'purge', contactMinutes: 0.5, at: at(0), ...by },
  ] as SanitationStepInput[];
}

export interface SanitationCycleOverrides {
  equipmentId: string;
  /** When the cycle ends (the purge of a complete cycle): the vessel's state changes then. Needed unless `steps` are given. */
  readyAt?: At;
  /** Default: a complete cycle (cycleSteps(readyAt)); 'cleaned' stops after the rinse. */
  until?: 'ready' | 'cleaned';
  /**
   * The steps as the checklist sends them; evaluated by the co-op's rules like a recorded cycle. A step
   * that breaks a rule of `checkSteps` must carry an `exceptionReason` (and the rule must be exceptable),
   * as the API requires; otherwise the factory throws.
   */
  steps?: SanitationStepInput[];
  /** Who recorded it (and performed steps that name nobody). */
  recordedBy?: string | null;
  notes?: string;
  /** Default: two minutes after the last step. */
  createdAt?: At;
}

export interface SanitationCycleWithSteps extends SanitationCycleRow {
  steps: SanitationStepRow[];
  evaluation: CycleEvaluation;
}

/**
 * A recorded sanitation cycle on a fermenter or keg, evaluated by shared/cellar/sanitation-rules
 * with the co-op's sanitation settings: the cycle row (outcome, issues, fresh_until), its steps,
 * and the vessel's state set to the outcome at the cycle's end with a history row
 * (writeStateChange from backend/modules/equipment/vessel-state.ts).
 */
export async function createSanitationCycle(db: Database, o: SanitationCycleOverrides): Promise<SanitationCycleWithSteps> {
  if (!o.steps && o.readyAt === undefined) throw new Error('createSanitationCycle: give readyAt or steps');
  const steps = o.steps ?? cycleSteps(o.readyAt!, { until: o.until ?? 'ready' });
  return inTransaction(db, async (trx) => {
    const settings = await sanitationSettings(trx);
    const refused = blockingViolations(steps, settings);
    if (refused.length) throw new Error(`createSanitationCycle: the API would refuse these steps: ${refused.map((v) => v.message).join(' ')}`);
    const ev = evaluateCycle(steps, settings);
    const vessel = await lockVessel(trx, o.equipmentId);
    if (!vessel) throw new Error(`createSanitationCycle: no vessel ${o.equipmentId}`);
    if (vessel.kind !== 'fermenter' && vessel.kind !== 'keg') throw new Error(`createSanitationCycle: ${vessel.code} is a ${vessel.kind}`);
    if (vessel.state === 'holding' || vessel.state === 'out_of_service') throw new Error(`createSanitationCycle: ${vessel.code} is ${vessel.state}`);
    const recordedBy = o.recordedBy ?? null;
    const cycle = await trx
      .insertInto('sanitation_cycle')
      .values({
        equipment_id: vessel.id,
        ...cycleFields(ev, settings),
        recorded_by: recordedBy,
        notes: o.notes ?? '',
        created_at: toDate(o.createdAt ?? new Date(ev.completedAt.getTime() + 2 * MINUTE), 'createdAt'),
      })
      .returningAll()
      .executeTakeFirstOrThrow();
    const stepRows = await trx
      .insertInto('sanitation_step')
      .values(buildStepRows(cycle.id, ev, steps, settings, recordedBy))
      .returningAll()
      .execute();
    if (vessel.state !== ev.outcome) {
      await writeStateChange(trx, vessel.id, vessel.state, ev.outcome, outcomeReason(ev, settings.freshnessDays), recordedBy, ev.completedAt);
    }
    return { ...cycle, steps: stepRows.sort((a, b) => a.position - b.position), evaluation: ev };
  });
}
