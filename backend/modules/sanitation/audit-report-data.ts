import { sql } from 'kysely';
import type { SanitationSettings, SanitationStep } from '../../../shared/schemas/cellar-settings.ts';
import type { Database } from '../../db/database.ts';
import type { PdfCoop } from '../../lib/pdf-frame.ts';
import { defaultLocale, formatDateTime } from '../../../shared/format/index.ts';
import { coopProfile } from '../settings/settings.service.ts';

/**
 * The sanitation audit's data (audit-report-document.ts lays it out, audit-report.ts renders it on
 * a PDF render thread): for a period and a set of vessels, every cycle with its steps, every
 * fill with the cycle that preceded it, the exceptions, and a summary per vessel. The data comes
 * from two set-based queries whatever the number of vessels (one flat query of vessels × cycles
 * × steps, one union of fill and emptying events with their neighbouring cycles); exceptions are
 * worked out in one pass per vessel.
 */

export type ExceptionKind =
  | 'fill_without_cycle'
  | 'fill_after_incomplete_cycle'
  | 'fill_after_lapse'
  | 'fill_reused_cycle'
  | 'late_cycle'
  | 'not_cleaned'
  | 'short_contact'
  | 'recorded_exception'
  | 'incomplete_cycle'
  | 'window_lapsed';

export interface AuditStep {
  step: SanitationStep;
  chemical: string | null;
  concentration: number | null;
  unit: string | null;
  contactMinutes: number | null;
  minimumContactMinutes: number | null;
  purgeMethod: string | null;
  at: Date;
  by: string | null;
  ok: boolean;
  /** The reason a step outside the co-op's rules was done anyway (null: none). */
  exceptionReason: string | null;
}
export interface AuditCycle {
  id: string;
  startedAt: Date;
  completedAt: Date;
  outcome: string;
  complete: boolean;
  issues: { code: string; message: string }[];
  freshUntil: Date | null;
  recordedBy: string | null;
  steps: AuditStep[];
}
export interface AuditFill {
  at: Date;
  batch: string | null;
  volumeLiters: number | null;
  cycle: { id: string; completedAt: Date; complete: boolean; freshUntil: Date | null; outcome: string } | null;
}
export interface AuditException {
  vesselCode: string;
  at: Date;
  kind: ExceptionKind;
  message: string;
}
export interface AuditVessel {
  id: string;
  code: string;
  name: string;
  kind: string;
  cycles: AuditCycle[];
  fills: AuditFill[];
  exceptions: AuditException[];
}
export interface AuditData {
  from: Date;
  to: Date;
  producedAt: Date;
  vessels: AuditVessel[];
  exceptions: AuditException[];
  settings: Pick<SanitationSettings, 'freshnessDays' | 'cleanWithinDays' | 'minimumContactMinutes' | 'minimumPurgeSeconds'>;
  /** Who the co-op is (coopProfile() in the settings service), for the letterhead and footer. */
  coop: PdfCoop;
  /** The co-op's time zone: every time in the report is read in it (UTC when not given). */
  timeZone?: string;
}

interface VesselFilter {
  ids?: string[] | undefined;
  kind?: 'fermenter' | 'keg' | undefined;
}

function vesselWhere(alias: string, f: VesselFilter) {
  const parts = [sql`${sql.ref(`${alias}.kind`)} in ('fermenter', 'keg')`];
  if (f.ids?.length) parts.push(sql`${sql.ref(`${alias}.id`)} = any(${f.ids}::uuid[])`);
  if (f.kind) parts.push(sql`${sql.ref(`${alias}.kind`)} = ${f.kind}`);
  return sql.join(parts, sql` and `);
}

const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/**
 * A timestamp as milliseconds since the epoch, a double: the year's 20,000 step rows each carry four
 * times, and a double is read as a number where a timestamp's text is parsed into a Date (the flat
 * query of the benchmark's year took 150–190 ms so, against 240–300 ms with timestamps). date_part,
 * unlike extract, returns a double rather than a numeric.
 */
const epochMs = (column: string) => sql`date_part('epoch', ${sql.ref(column)}) * 1000`;
const DAY = 86_400_000;

export async function loadAuditData(
  db: Database,
  {
    from,
    to,
    filter,
    settings,
    now,
    timeZone: zone,
  }: { from: Date; to: Date; filter: VesselFilter; settings: SanitationSettings; now: Date; timeZone?: string },
): Promise<AuditData> {
  const [coop, cycleRows, eventRows] = await Promise.all([
    coopProfile(db),
    sql<{
      vessel_id: string;
      code: string;
      name: string;
      kind: string;
      cycle_id: string | null;
      started_ms: number | null;
      completed_ms: number | null;
      outcome: string | null;
      complete: boolean | null;
      issues: { code: string; message: string }[] | null;
      fresh_until_ms: number | null;
      recorded_by: string | null;
      step: SanitationStep | null;
      chemical: string | null;
      concentration: string | number | null;
      concentration_unit: string | null;
      contact_minutes: string | number | null;
      minimum_contact_minutes: string | number | null;
      purge_method: string | null;
      step_ms: number | null;
      ok: boolean | null;
      performed_by: string | null;
      exception_reason: string | null;
    }>`
      select e.id as vessel_id, e.code, e.name, e.kind,
        c.id as cycle_id, ${epochMs('c.started_at')} as started_ms, ${epochMs('c.completed_at')} as completed_ms, c.outcome, c.complete, c.issues,
        ${epochMs('c.fresh_until')} as fresh_until_ms, r.name as recorded_by,
        s.step, s.chemical, s.concentration, s.concentration_unit, s.contact_minutes, s.minimum_contact_minutes, s.purge_method,
        ${epochMs('s.at')} as step_ms, s.ok, p.name as performed_by, s.exception_reason
      from equipment e
      left join sanitation_cycle c on c.equipment_id = e.id and c.completed_at >= ${from} and c.completed_at < ${to}
      left join app_user r on r.id = c.recorded_by
      left join sanitation_step s on s.cycle_id = c.id
      left join app_user p on p.id = s.performed_by
      where ${vesselWhere('e', filter)}
      order by e.kind, e.code, c.completed_at, c.id, s.position`.execute(db),
    sql<{
      type: 'fill' | 'emptied';
      vessel_id: string;
      at: Date;
      batch: string | null;
      volume_liters: string | number | null;
      cycle_id: string | null;
      cycle_completed_at: Date | null;
      cycle_started_at: Date | null;
      cycle_complete: boolean | null;
      cycle_fresh_until: Date | null;
      cycle_outcome: string | null;
    }>`
      select 'fill' as type, kf.keg_id as vessel_id, kf.filled_at as at, b.name as batch, kf.volume_liters,
        pc.id as cycle_id, pc.completed_at as cycle_completed_at, pc.started_at as cycle_started_at,
        pc.complete as cycle_complete, pc.fresh_until as cycle_fresh_until, pc.outcome as cycle_outcome
      from keg_fill kf
      join equipment e on e.id = kf.keg_id
      join batch b on b.id = kf.batch_id
      left join lateral (
        select c.id, c.completed_at, c.started_at, c.complete, c.fresh_until, c.outcome from sanitation_cycle c
        where c.equipment_id = kf.keg_id and c.completed_at <= kf.filled_at order by c.completed_at desc limit 1
      ) pc on true
      where kf.filled_at >= ${from} and kf.filled_at < ${to} and ${vesselWhere('e', filter)}
      union all
      select 'fill', sc.equipment_id, sc.at,
        (select b.name from booking bk join batch b on b.id = bk.batch_id
          where bk.equipment_id = sc.equipment_id and bk.state <> 'cancelled' and bk.starts_at <= sc.at + interval '1 day' and bk.ends_at >= sc.at
          order by bk.starts_at desc limit 1),
        null,
        pc.id, pc.completed_at, pc.started_at, pc.complete, pc.fresh_until, pc.outcome
      from equipment_state_change sc
      join equipment e on e.id = sc.equipment_id and e.kind = 'fermenter'
      left join lateral (
        select c.id, c.completed_at, c.started_at, c.complete, c.fresh_until, c.outcome from sanitation_cycle c
        where c.equipment_id = sc.equipment_id and c.completed_at <= sc.at order by c.completed_at desc limit 1
      ) pc on true
      where sc.to_state = 'holding' and sc.from_state is distinct from 'holding' and sc.at >= ${from} and sc.at < ${to} and ${vesselWhere('e', filter)}
      union all
      select 'emptied', ev.vessel_id, ev.at, null, null,
        nc.id, nc.completed_at, nc.started_at, nc.complete, nc.fresh_until, nc.outcome
      from (
        select sc.equipment_id as vessel_id, sc.at from equipment_state_change sc
        where sc.from_state = 'holding' and sc.to_state <> 'holding' and sc.at >= ${from} and sc.at < ${to}
        union
        select t.from_equipment_id, t.transferred_at from transfer t where t.transferred_at >= ${from} and t.transferred_at < ${to}
        union
        select km.keg_id, km.at from keg_movement km where km.action = 'returned' and km.at >= ${from} and km.at < ${to}
      ) ev
      join equipment e on e.id = ev.vessel_id
      left join lateral (
        select c.id, c.completed_at, c.started_at, c.complete, c.fresh_until, c.outcome from sanitation_cycle c
        where c.equipment_id = ev.vessel_id and c.started_at >= ev.at order by c.started_at limit 1
      ) nc on true
      where ${vesselWhere('e', filter)}`.execute(db),
  ]);

  const timeZone = zone ?? coop.timeZone;
  const ctx = { locale: defaultLocale, timeZone };

  // Vessels with their cycles and steps, from the flat rows (already ordered).
  const vessels: AuditVessel[] = [];
  const byId = new Map<string, AuditVessel>();
  let lastCycle: AuditCycle | null = null;
  for (const r of cycleRows.rows) {
    let v = byId.get(r.vessel_id);
    if (!v) {
      v = { id: r.vessel_id, code: r.code, name: r.name, kind: r.kind, cycles: [], fills: [], exceptions: [] };
      byId.set(v.id, v);
      vessels.push(v);
      lastCycle = null;
    }
    if (!r.cycle_id) continue;
    if (!lastCycle || lastCycle.id !== r.cycle_id) {
      lastCycle = {
        id: r.cycle_id,
        startedAt: new Date(r.started_ms!),
        completedAt: new Date(r.completed_ms!),
        outcome: r.outcome!,
        complete: Boolean(r.complete),
        issues: Array.isArray(r.issues) ? r.issues : [],
        freshUntil: r.fresh_until_ms === null ? null : new Date(r.fresh_until_ms),
        recordedBy: r.recorded_by,
        steps: [],
      };
      v.cycles.push(lastCycle);
    }
    if (r.step) {
      lastCycle.steps.push({
        step: r.step,
        chemical: r.chemical,
        concentration: n(r.concentration),
        unit: r.concentration_unit,
        contactMinutes: n(r.contact_minutes),
        minimumContactMinutes: n(r.minimum_contact_minutes),
        purgeMethod: r.purge_method,
        at: new Date(r.step_ms!),
        by: r.performed_by,
        ok: Boolean(r.ok),
        exceptionReason: r.exception_reason,
      });
    }
  }

  const emptied = new Map<string, { at: Date; next: { startedAt: Date; id: string } | null }[]>();
  for (const e of eventRows.rows) {
    const v = byId.get(e.vessel_id);
    if (!v) continue;
    if (e.type === 'fill') {
      v.fills.push({
        at: e.at,
        batch: e.batch,
        volumeLiters: n(e.volume_liters),
        cycle: e.cycle_id
          ? {
              id: e.cycle_id,
              completedAt: e.cycle_completed_at!,
              complete: Boolean(e.cycle_complete),
              freshUntil: e.cycle_fresh_until,
              outcome: e.cycle_outcome!,
            }
          : null,
      });
    } else {
      const list = emptied.get(v.id) ?? [];
      list.push({ at: e.at, next: e.cycle_id ? { startedAt: e.cycle_started_at!, id: e.cycle_id } : null });
      emptied.set(v.id, list);
    }
  }

  const fmt = (d: Date) => formatDateTime(d, ctx);
  const horizon = Math.min(to.getTime(), now.getTime());
  for (const v of vessels) {
    v.fills.sort((a, b) => a.at.getTime() - b.at.getTime());
    const add = (at: Date, kind: ExceptionKind, message: string) => v.exceptions.push({ vesselCode: v.code, at, kind, message });

    for (const c of v.cycles) {
      const short = c.issues.filter((i) => i.code === 'short_contact');
      for (const i of short) add(c.completedAt, 'short_contact', i.message);
      // Steps recorded against a rule with a reason (shared/cellar/sanitation-rules.ts `checkSteps`).
      for (const i of c.issues.filter((i) => i.code === 'exception')) add(c.completedAt, 'recorded_exception', i.message);
      if (!c.complete) {
        const other = c.issues.filter((i) => i.code !== 'short_contact' && i.code !== 'exception').map((i) => i.message);
        add(
          c.completedAt,
          'incomplete_cycle',
          `Left the vessel ${c.outcome.replace('_', ' ')}${other.length ? `: ${other.join(' ')}` : short.length ? ' (short contact).' : '.'}`,
        );
      }
    }

    let previousFillCycle: string | null = null;
    for (const f of v.fills) {
      if (!f.cycle) add(f.at, 'fill_without_cycle', `Filled${f.batch ? ` with ${f.batch}` : ''} with no sanitation cycle on record before it.`);
      else if (!f.cycle.complete)
        add(f.at, 'fill_after_incomplete_cycle', `Filled after a cycle that left it ${f.cycle.outcome.replace('_', ' ')} (${fmt(f.cycle.completedAt)}).`);
      else if (f.cycle.freshUntil && f.cycle.freshUntil.getTime() < f.at.getTime()) {
        add(f.at, 'fill_after_lapse', `Filled after its freshness window ended at ${fmt(f.cycle.freshUntil)}.`);
      } else if (previousFillCycle && previousFillCycle === f.cycle.id) {
        add(f.at, 'fill_reused_cycle', 'Filled again without a new cycle since the previous fill.');
      }
      previousFillCycle = f.cycle?.id ?? null;
    }

    // Emptying events: merge those within five minutes (a return that also emptied the keg is one event).
    const used = (emptied.get(v.id) ?? []).sort((a, b) => a.at.getTime() - b.at.getTime());
    const merged: typeof used = [];
    for (const u of used) {
      const last = merged[merged.length - 1];
      if (last && u.at.getTime() - last.at.getTime() < 5 * 60_000) continue;
      merged.push(u);
    }
    const allowance = settings.cleanWithinDays * DAY;
    for (const u of merged) {
      if (u.next) {
        const gap = u.next.startedAt.getTime() - u.at.getTime();
        const took = gap < 3 * DAY ? `${Math.round(gap / 3_600_000)} hours` : `${(gap / DAY).toFixed(1)} days`;
        if (gap > allowance)
          add(u.next.startedAt, 'late_cycle', `Cleaned ${took} after it was emptied on ${fmt(u.at)} (allowed ${settings.cleanWithinDays} days).`);
      } else if (u.at.getTime() + allowance < horizon) {
        add(new Date(u.at.getTime() + allowance), 'not_cleaned', `Emptied on ${fmt(u.at)} and not cleaned within ${settings.cleanWithinDays} days.`);
      }
    }

    // Lapsed windows: a complete cycle whose window ended before any fill or later cycle.
    for (let i = 0; i < v.cycles.length; i++) {
      const c = v.cycles[i]!;
      if (!c.complete || !c.freshUntil) continue;
      const end = c.freshUntil.getTime();
      if (end >= horizon) continue;
      const nextCycle = v.cycles[i + 1]?.startedAt.getTime() ?? Infinity;
      const nextFill = v.fills.find((f) => f.at.getTime() >= c.completedAt.getTime())?.at.getTime() ?? Infinity;
      if (Math.min(nextCycle, nextFill) > end) add(c.freshUntil, 'window_lapsed', `Sanitized ${fmt(c.completedAt)}; stood unused until its window ended.`);
    }
    v.exceptions.sort((a, b) => a.at.getTime() - b.at.getTime());
  }

  const exceptions = vessels.flatMap((v) => v.exceptions).sort((a, b) => a.at.getTime() - b.at.getTime() || a.vesselCode.localeCompare(b.vesselCode));
  return {
    from,
    to,
    producedAt: now,
    coop: { coopName: coop.coopName, addressLines: coop.addressLines, email: coop.email, timeZone },
    timeZone,
    vessels,
    exceptions,
    settings: {
      freshnessDays: settings.freshnessDays,
      cleanWithinDays: settings.cleanWithinDays,
      minimumContactMinutes: settings.minimumContactMinutes,
      minimumPurgeSeconds: settings.minimumPurgeSeconds,
    },
  };
}
