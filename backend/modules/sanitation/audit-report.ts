import { sql } from 'kysely';
import type { Content, TableCell, TDocumentDefinitions } from 'pdfmake/interfaces';
import { alcoholCaution, chemicalCautions, deferToLocalCodes, pressureCautions } from '../../../shared/cellar/cautions.ts';
import { sanitationStepLabels, type SanitationSettings, type SanitationStep } from '../../../shared/schemas/cellar-settings.ts';
import type { Database } from '../../db/database.ts';
import { renderPdfOffThread } from '../../lib/pdf-render.ts';
import { keepHeadingsWithNext, pdfFont, renderPdf } from '../../lib/pdf.ts';
import { defaultLocale, formatDate, formatDateTime, formatDayMonth, formatTime, type FormatContext } from '../../../shared/format/index.ts';

/**
 * The sanitation audit: for a period and a set of vessels, every cycle with its steps, every
 * fill with the cycle that preceded it, the exceptions, and a summary per vessel. The data comes
 * from two set-based queries whatever the number of vessels (one flat query of vessels × cycles
 * × steps, one union of fill and emptying events with their neighbouring cycles); exceptions are
 * worked out in one pass per vessel.
 */

export const coopName = 'Larkspur Yard Brewing Co-op';

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

export const exceptionLabels: Record<ExceptionKind, string> = {
  fill_without_cycle: 'Fill with no cycle on record',
  fill_after_incomplete_cycle: 'Fill after an incomplete cycle',
  fill_after_lapse: 'Fill after the freshness window lapsed',
  fill_reused_cycle: 'Second fill on one cycle',
  late_cycle: 'Late cycle',
  not_cleaned: 'Not cleaned in time',
  short_contact: 'Short contact time',
  recorded_exception: 'Recorded exception',
  incomplete_cycle: 'Incomplete cycle',
  window_lapsed: 'Freshness window lapsed',
};

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
const DAY = 86_400_000;

export async function loadAuditData(
  db: Database,
  {
    from,
    to,
    filter,
    settings,
    now,
    timeZone = 'UTC',
  }: { from: Date; to: Date; filter: VesselFilter; settings: SanitationSettings; now: Date; timeZone?: string },
): Promise<AuditData> {
  const ctx = { locale: defaultLocale, timeZone };
  const [cycleRows, eventRows] = await Promise.all([
    sql<{
      vessel_id: string;
      code: string;
      name: string;
      kind: string;
      cycle_id: string | null;
      started_at: Date | null;
      completed_at: Date | null;
      outcome: string | null;
      complete: boolean | null;
      issues: { code: string; message: string }[] | null;
      fresh_until: Date | null;
      recorded_by: string | null;
      step: SanitationStep | null;
      chemical: string | null;
      concentration: string | number | null;
      concentration_unit: string | null;
      contact_minutes: string | number | null;
      minimum_contact_minutes: string | number | null;
      purge_method: string | null;
      step_at: Date | null;
      ok: boolean | null;
      performed_by: string | null;
      exception_reason: string | null;
    }>`
      select e.id as vessel_id, e.code, e.name, e.kind,
        c.id as cycle_id, c.started_at, c.completed_at, c.outcome, c.complete, c.issues, c.fresh_until, r.name as recorded_by,
        s.step, s.chemical, s.concentration, s.concentration_unit, s.contact_minutes, s.minimum_contact_minutes, s.purge_method,
        s.at as step_at, s.ok, p.name as performed_by, s.exception_reason
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
        startedAt: r.started_at!,
        completedAt: r.completed_at!,
        outcome: r.outcome!,
        complete: Boolean(r.complete),
        issues: Array.isArray(r.issues) ? r.issues : [],
        freshUntil: r.fresh_until,
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
        at: r.step_at!,
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

// ---------------------------------------------------------------------------------------------
// The PDF
// ---------------------------------------------------------------------------------------------

const ink = '#1d1b18';
const muted = '#5c564d';
const copper = '#8f4520';
const danger = '#b42318';
const hop = '#4b5a26';
const rule = '#c9bca8';

// Times through the one formatter in the report's time zone (set by auditDocument for the document it lays out).
let reportContext: FormatContext = { locale: defaultLocale, timeZone: 'UTC' };
const when = (d: Date) => formatDateTime(d, reportContext);
const stepWhen = (d: Date) => `${formatDayMonth(d, reportContext)} ${formatTime(d, reportContext)}`;
/** The period's bounds are UTC midnights of calendar days. */
const day = (d: Date) => formatDate(d.toISOString().slice(0, 10), reportContext);
const minutes = (m: number | null) => (m === null ? '—' : m < 1 ? `${Math.round(m * 60)} s` : `${Number.isInteger(m) ? m : m.toFixed(1)} min`);

function stepLine(s: AuditStep): string {
  const parts = [sanitationStepLabels[s.step]];
  if (s.chemical) parts.push(s.chemical);
  if (s.concentration !== null) parts.push(`${s.concentration}${s.unit ? ` ${s.unit}` : ''}`);
  if (s.step === 'purge') parts.push(s.purgeMethod === 'push_out' ? 'push-out' : `flush ${minutes(s.contactMinutes)}`);
  else if (s.step !== 'rinse') parts.push(minutes(s.contactMinutes));
  parts.push(`${s.by ?? 'unknown'}, ${stepWhen(s.at)}`);
  if (s.exceptionReason) parts.push(`exception: ${s.exceptionReason}`);
  return `${s.ok ? '' : '[!] '}${s.exceptionReason ? '[exception] ' : ''}${parts.join(' · ')}`;
}

const compact = {
  hLineWidth: (i: number) => (i === 1 ? 0.8 : 0.3),
  vLineWidth: () => 0,
  hLineColor: () => rule,
  paddingLeft: () => 3,
  paddingRight: () => 3,
  paddingTop: () => 1.5,
  paddingBottom: () => 1.5,
};

function header(cells: string[]): TableCell[] {
  return cells.map((t) => ({ text: t, color: muted, fontSize: 7 }));
}

export function auditDocument(data: AuditData, vesselSetLabel: string): TDocumentDefinitions {
  reportContext = { locale: defaultLocale, timeZone: data.timeZone ?? 'UTC' };
  const zone = reportContext.timeZone;
  const period = `${day(data.from)} to ${day(new Date(data.to.getTime() - 1))}`;
  const totals = data.vessels.reduce(
    (t, v) => ({
      cycles: t.cycles + v.cycles.length,
      complete: t.complete + v.cycles.filter((c) => c.complete).length,
      fills: t.fills + v.fills.length,
    }),
    { cycles: 0, complete: 0, fills: 0 },
  );

  const content: Content[] = [
    { text: 'Sanitation audit', fontSize: 18, color: ink },
    { text: coopName, fontSize: 11, color: copper, margin: [0, 2, 0, 0] },
    {
      margin: [0, 6, 0, 8],
      columns: [
        { width: '*', text: [{ text: 'Period ', color: muted }, period, { text: '   Vessels ', color: muted }, vesselSetLabel] },
        { width: 'auto', text: [{ text: 'Produced ', color: muted }, `${when(data.producedAt)} (${zone})`] },
      ],
    },
    {
      text: `Rules in force: a complete cycle is clean (at least ${minutes(data.settings.minimumContactMinutes.clean)} contact), rinse, sanitize (at least ${minutes(data.settings.minimumContactMinutes.sanitize)}) and CO2 purge, in that order; it keeps a vessel ready for ${data.settings.freshnessDays} days; an emptied or returned vessel is due for cleaning within ${data.settings.cleanWithinDays} days. Each chemical is used within its working strength, a timed CO2 flush lasts at least ${data.settings.minimumPurgeSeconds} s, and a caustic clean follows a vent; a step done against one of these rules is recorded only with its reason and listed as a recorded exception.`,
      color: muted,
      fontSize: 7.5,
      margin: [0, 0, 0, 8],
    },
    {
      text: `${data.vessels.length} vessels · ${totals.cycles} cycles (${totals.complete} complete) · ${totals.fills} fills · ${data.exceptions.length} exceptions`,
      margin: [0, 0, 0, 8],
    },
    { text: 'Summary by vessel', fontSize: 12, color: ink, margin: [0, 4, 0, 4] },
    {
      table: {
        headerRows: 1,
        widths: [40, '*', 44, 40, 44, 30, 50, 78],
        body: [
          header(['Vessel', 'Name', 'Kind', 'Cycles', 'Complete', 'Fills', 'Exceptions', 'Last cycle']),
          ...data.vessels.map((v): TableCell[] => {
            const last = v.cycles[v.cycles.length - 1];
            return [
              v.code,
              v.name,
              v.kind,
              String(v.cycles.length),
              String(v.cycles.filter((c) => c.complete).length),
              String(v.fills.length),
              { text: String(v.exceptions.length), color: v.exceptions.length ? danger : hop },
              last ? `${when(last.completedAt)}` : '—',
            ];
          }),
        ],
      },
      layout: compact,
    },
    { text: 'Exceptions', fontSize: 12, color: ink, margin: [0, 12, 0, 4], headlineLevel: 1 },
    data.exceptions.length
      ? {
          table: {
            headerRows: 1,
            dontBreakRows: true,
            widths: [40, 80, 150, '*'],
            body: [
              header(['Vessel', 'When', 'Exception', 'Detail']),
              ...data.exceptions.map((e): TableCell[] => [
                e.vesselCode,
                { text: when(e.at), noWrap: true },
                { text: exceptionLabels[e.kind], color: danger, noWrap: true },
                e.message,
              ]),
            ],
          },
          layout: compact,
        }
      : { text: 'No exceptions in this period.', color: hop },
  ];

  for (const v of data.vessels) {
    content.push({ text: `${v.code} · ${v.name}`, fontSize: 11, color: ink, margin: [0, 12, 0, 3], headlineLevel: 1 });
    if (!v.cycles.length) content.push({ text: 'No cycles in this period.', color: muted });
    else
      content.push({
        table: {
          headerRows: 1,
          widths: [66, 44, '*'],
          body: [
            header(['Completed', 'Outcome', 'Steps (chemical · strength · contact · who, when) and recorded by']),
            ...v.cycles.map((c): TableCell[] => [
              { text: when(c.completedAt), noWrap: true },
              { text: c.outcome.replace('_', ' '), color: c.complete ? hop : danger },
              {
                // One unbroken line per step: pdfmake lays out a line as one piece, which keeps a year's report fast.
                stack: [
                  ...c.steps.map((st) =>
                    st.exceptionReason
                      ? { text: stepLine(st), color: danger }
                      : st.ok
                        ? { text: stepLine(st), noWrap: true }
                        : { text: stepLine(st), noWrap: true, color: danger },
                  ),
                  {
                    text: `recorded by ${c.recordedBy ?? 'unknown'}${c.complete ? `; fresh until ${when(c.freshUntil!)}` : ''}`,
                    noWrap: true,
                    color: muted,
                  },
                  ...(c.complete ? [] : [{ text: c.issues.map((i) => i.message).join(' '), color: danger }]),
                ],
              },
            ]),
          ],
        },
        layout: compact,
      });
    if (v.fills.length) {
      content.push({ text: 'Fills', color: muted, margin: [0, 4, 0, 2] });
      content.push({
        table: {
          headerRows: 1,
          widths: [66, '*', 40, '*'],
          body: [
            header(['Filled', 'Batch', 'Litres', 'Preceding cycle']),
            ...v.fills.map((f): TableCell[] => [
              { text: when(f.at), noWrap: true },
              f.batch ?? '—',
              f.volumeLiters === null ? '—' : f.volumeLiters.toFixed(1),
              f.cycle
                ? {
                    text: `${when(f.cycle.completedAt)} ${f.cycle.complete ? 'complete' : f.cycle.outcome.replace('_', ' ')}${f.cycle.freshUntil && f.cycle.freshUntil < f.at ? ' (window lapsed)' : ''}`,
                    color: f.cycle.complete && !(f.cycle.freshUntil && f.cycle.freshUntil < f.at) ? ink : danger,
                  }
                : { text: 'none on record', color: danger },
            ]),
          ],
        },
        layout: compact,
      });
    }
  }

  content.push({
    stack: [
      { text: 'Safety cautions', fontSize: 12, color: danger, margin: [0, 16, 0, 4] },
      { ul: [...chemicalCautions, ...pressureCautions, alcoholCaution], color: ink },
      { text: deferToLocalCodes, color: muted, margin: [0, 4, 0, 0] },
    ],
    unbreakable: true,
  });

  return {
    pageSize: 'A4',
    pageMargins: [36, 40, 36, 40],
    info: { title: `Sanitation audit ${period}`, author: coopName, creator: 'Cellarwright' },
    defaultStyle: { font: pdfFont, fontSize: 8, color: ink, lineHeight: 1.1 },
    pageBreakBefore: keepHeadingsWithNext,
    header: (page) => (page === 1 ? { text: '' } : { text: `${coopName} · Sanitation audit ${period}`, fontSize: 7, color: muted, margin: [36, 20, 36, 0] }),
    footer: (page, pages) => ({
      margin: [36, 10, 36, 0],
      columns: [
        { text: `Produced ${when(data.producedAt)} (${zone}) by Cellarwright`, fontSize: 7, color: muted },
        { text: `Page ${page} of ${pages}`, alignment: 'right', fontSize: 7, color: muted },
      ],
    }),
    content,
  };
}

export async function renderAuditPdf(data: AuditData, vesselSetLabel: string): Promise<Buffer> {
  return renderPdf(auditDocument(data, vesselSetLabel));
}

/**
 * The same PDF, laid out on a PDF render thread (backend/lib/pdf-render.ts) so a year's report does
 * not hold up the app instance's other requests. The data is plain (Dates and strings); the thread
 * builds the document definition, header and footer callbacks included, with auditDocument above.
 */
/** A one-line PDF, laid out in the render thread so that module, pdfmake and the font are loaded there. */
export function renderWarmUpPdf(): Promise<Buffer> {
  return renderPdf({ content: [{ text: coopName }], defaultStyle: { font: pdfFont } });
}

/** Starts the render thread ahead of the first audit (about 2 s of start-up otherwise paid by that request). */
export function warmAuditRenderer(): Promise<Buffer> {
  return renderPdfOffThread({ module: new URL(import.meta.url), exportName: 'renderWarmUpPdf', args: [] });
}

export function renderAuditPdfOffThread(data: AuditData, vesselSetLabel: string): Promise<Buffer> {
  return renderPdfOffThread({ module: new URL(import.meta.url), exportName: 'renderAuditPdf', args: [data, vesselSetLabel] });
}
