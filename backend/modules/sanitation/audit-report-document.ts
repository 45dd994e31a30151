import type { Content, TableCell, TableLayout, TDocumentDefinitions } from 'pdfmake/interfaces';
import { alcoholCaution, chemicalCautions, pressureCautions } from '../../../shared/cellar/cautions.ts';
import { sanitationStepLabels } from '../../../shared/schemas/cellar-settings.ts';
import { defaultLocale, formatDate, formatDateTime, formatDayMonth, formatTime, type FormatContext } from '../../../shared/format/index.ts';
import { framedDocument, pdfColours, producedLabel } from '../../lib/pdf-frame.ts';
import type { AuditCycle, AuditData, AuditFill, AuditStep, AuditVessel, ExceptionKind } from './audit-report-data.ts';

/**
 * The sanitation audit's layout (the data comes from audit-report-data.ts): in the one PDF frame
 * (lib/pdf-frame.ts), the rules in force, a summary per vessel, the exceptions, and each vessel's
 * cycles and fills. Pure: it runs on a PDF render thread (audit-report.ts) as well as in-process.
 *
 * A year of 80 vessels is some 400 pages, so the layout keeps pdfmake's work per row small: each
 * vessel's heading is a header row of its own table (repeated on every page the table runs over,
 * and kept with its first row), so no heading needs pdfmake's keep-with-next pass, which measures
 * every node of the document once more.
 */

const { ink, muted, danger, hop, rule } = pdfColours;

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

/** Times through the one formatter, in the report's time zone. */
function formatters(ctx: FormatContext) {
  return {
    when: (d: Date) => formatDateTime(d, ctx),
    stepWhen: (d: Date) => `${formatDayMonth(d, ctx)} ${formatTime(d, ctx)}`,
    /** The period's bounds are UTC midnights of calendar days. */
    day: (d: Date) => formatDate(d.toISOString().slice(0, 10), ctx),
  };
}
type Formatters = ReturnType<typeof formatters>;

const minutes = (m: number | null) => (m === null ? '—' : m < 1 ? `${Math.round(m * 60)} s` : `${Number.isInteger(m) ? m : m.toFixed(1)} min`);
const outcomeText = (outcome: string) => outcome.replace('_', ' ');

function stepLine(s: AuditStep, f: Formatters): string {
  const parts = [sanitationStepLabels[s.step]];
  if (s.chemical) parts.push(s.chemical);
  if (s.concentration !== null) parts.push(`${s.concentration}${s.unit ? ` ${s.unit}` : ''}`);
  if (s.step === 'purge') parts.push(s.purgeMethod === 'push_out' ? 'push-out' : `flush ${minutes(s.contactMinutes)}`);
  else if (s.step !== 'rinse') parts.push(minutes(s.contactMinutes));
  parts.push(`${s.by ?? 'unknown'}, ${f.stepWhen(s.at)}`);
  if (s.exceptionReason) parts.push(`exception: ${s.exceptionReason}`);
  return `${s.ok ? '' : '[!] '}${s.exceptionReason ? '[exception] ' : ''}${parts.join(' · ')}`;
}

const compact: TableLayout = {
  hLineWidth: (i, node) => (i === (node.table.headerRows ?? 1) ? 0.8 : 0.3),
  vLineWidth: () => 0,
  hLineColor: () => rule,
  paddingLeft: () => 3,
  paddingRight: () => 3,
  paddingTop: () => 1.5,
  paddingBottom: () => 1.5,
};

const header = (cells: string[]): TableCell[] => cells.map((t) => ({ text: t, color: muted, fontSize: 7 }));

/** A heading as the first header row of its table: it spans the table and comes back atop each page the table runs over. */
function headingRow(text: string, columns: number, style: { fontSize: number; color: string; margin: [number, number, number, number] }): TableCell[] {
  return [{ text, colSpan: columns, border: [false, false, false, false], ...style }, ...Array.from({ length: columns - 1 }, () => ({}))];
}

/** A table under a heading row, kept with its first body row. */
function headedTable(heading: TableCell[], columns: string[], widths: (number | string)[], rows: TableCell[][], dontBreakRows = false): Content {
  return { table: { headerRows: 2, keepWithHeaderRows: 1, dontBreakRows, widths, body: [heading, header(columns), ...rows] }, layout: compact };
}

function cycleRow(c: AuditCycle, f: Formatters): TableCell[] {
  return [
    { text: f.when(c.completedAt), noWrap: true },
    { text: outcomeText(c.outcome), color: c.complete ? hop : danger },
    {
      // One unbroken line per step: pdfmake lays out a line as one piece, which keeps a year's report fast.
      stack: [
        ...c.steps.map((st) =>
          st.exceptionReason
            ? { text: stepLine(st, f), color: danger }
            : st.ok
              ? { text: stepLine(st, f), noWrap: true }
              : { text: stepLine(st, f), noWrap: true, color: danger },
        ),
        { text: `recorded by ${c.recordedBy ?? 'unknown'}${c.complete ? `; fresh until ${f.when(c.freshUntil!)}` : ''}`, noWrap: true, color: muted },
        ...(c.complete ? [] : [{ text: c.issues.map((i) => i.message).join(' '), color: danger }]),
      ],
    },
  ];
}

function fillRow(fill: AuditFill, f: Formatters): TableCell[] {
  const lapsed = Boolean(fill.cycle?.freshUntil && fill.cycle.freshUntil < fill.at);
  return [
    { text: f.when(fill.at), noWrap: true },
    fill.batch ?? '—',
    fill.volumeLiters === null ? '—' : fill.volumeLiters.toFixed(1),
    // One unbroken line, as a step's: its width is known (a time, an outcome, the lapse), so it is never wrapped word by word.
    fill.cycle
      ? {
          text: `${f.when(fill.cycle.completedAt)} ${fill.cycle.complete ? 'complete' : outcomeText(fill.cycle.outcome)}${lapsed ? ' (window lapsed)' : ''}`,
          noWrap: true,
          color: fill.cycle.complete && !lapsed ? ink : danger,
        }
      : { text: 'none on record', noWrap: true, color: danger },
  ];
}

function vesselBlocks(v: AuditVessel, f: Formatters): Content[] {
  const title = `${v.code} · ${v.name}`;
  const heading = { fontSize: 11, color: ink, margin: [0, 12, 0, 3] as [number, number, number, number] };
  const blocks: Content[] = v.cycles.length
    ? [
        headedTable(
          headingRow(title, 3, heading),
          ['Completed', 'Outcome', 'Steps (chemical · strength · contact · who, when) and recorded by'],
          [80, 44, '*'],
          v.cycles.map((c) => cycleRow(c, f)),
        ),
      ]
    : [
        {
          stack: [
            { text: title, ...heading },
            { text: 'No cycles in this period.', color: muted },
          ],
          unbreakable: true,
        },
      ];
  if (v.fills.length)
    blocks.push(
      headedTable(
        headingRow(`${v.code} · fills`, 4, { fontSize: 8, color: muted, margin: [0, 4, 0, 2] }),
        ['Filled', 'Batch', 'Litres', 'Preceding cycle'],
        [80, '*', 40, '*'],
        v.fills.map((fill) => fillRow(fill, f)),
      ),
    );
  return blocks;
}

/** A vessel's line in the summary: what the part that opens a report split in parts (audit-report.ts) is given of every vessel. */
export interface VesselSummary {
  code: string;
  name: string;
  kind: string;
  cycles: number;
  complete: number;
  fills: number;
  exceptions: number;
  lastCompletedAt: Date | null;
}

export function vesselSummary(v: AuditVessel): VesselSummary {
  return {
    code: v.code,
    name: v.name,
    kind: v.kind,
    cycles: v.cycles.length,
    complete: v.cycles.filter((c) => c.complete).length,
    fills: v.fills.length,
    exceptions: v.exceptions.length,
    lastCompletedAt: v.cycles[v.cycles.length - 1]?.completedAt ?? null,
  };
}

/**
 * One part of a report laid out in parts on several render threads and joined (audit-report.ts): its
 * `data.vessels` are the vessels whose sections it lays out; the first part opens the report (the rules,
 * the totals and summary of `summary`, every vessel's, and the exceptions), the last closes it (the cautions).
 */
export interface AuditPart {
  first: boolean;
  last: boolean;
  summary: VesselSummary[];
}

/** The audit as one document, or (with `part`) one part of it. */
export function auditDocument(data: AuditData, vesselSetLabel: string, part?: AuditPart): TDocumentDefinitions {
  const zone = data.timeZone ?? data.coop.timeZone;
  const f = formatters({ locale: defaultLocale, timeZone: zone });
  const period = `${f.day(data.from)} to ${f.day(new Date(data.to.getTime() - 1))}`;
  const sections = data.vessels.flatMap((v) => vesselBlocks(v, f));
  return framedDocument({
    coop: data.coop,
    title: 'Sanitation audit',
    producedAt: data.producedAt,
    density: 'report',
    runningHeader: `${data.coop.coopName} · Sanitation audit ${period}`,
    keepHeadingsWithNext: false,
    cautions: [...chemicalCautions, ...pressureCautions, alcoholCaution],
    subject: `Sanitation audit ${period}`,
    ...(part ? { part: { first: part.first, last: part.last } } : {}),
    content: part && !part.first ? sections : [...overview(data, vesselSetLabel, part?.summary ?? data.vessels.map(vesselSummary), period, f), ...sections],
  });
}

/** What opens the report: the period and vessels, the rules in force, the totals, the summary by vessel and the exceptions. */
function overview(data: AuditData, vesselSetLabel: string, summary: VesselSummary[], period: string, f: Formatters): Content[] {
  const zone = data.timeZone ?? data.coop.timeZone;
  const totals = summary.reduce((t, v) => ({ cycles: t.cycles + v.cycles, complete: t.complete + v.complete, fills: t.fills + v.fills }), {
    cycles: 0,
    complete: 0,
    fills: 0,
  });
  const s = data.settings;
  const exceptionsHeading = { fontSize: 12, color: ink, margin: [0, 12, 0, 4] as [number, number, number, number] };

  return [
    {
      margin: [0, 10, 0, 8],
      columns: [
        { width: '*', text: [{ text: 'Period ', color: muted }, period, { text: '   Vessels ', color: muted }, vesselSetLabel] },
        { width: 'auto', text: [{ text: 'Produced ', color: muted }, producedLabel(data.producedAt, zone)] },
      ],
    },
    {
      text: `Rules in force: a complete cycle is clean (at least ${minutes(s.minimumContactMinutes.clean)} contact), rinse, sanitize (at least ${minutes(s.minimumContactMinutes.sanitize)}) and CO2 purge, in that order; it keeps a vessel ready for ${s.freshnessDays} days; an emptied or returned vessel is due for cleaning within ${s.cleanWithinDays} days. Each chemical is used within its working strength, a timed CO2 flush lasts at least ${s.minimumPurgeSeconds} s, and a caustic clean follows a vent; a step done against one of these rules is recorded only with its reason and listed as a recorded exception.`,
      color: muted,
      fontSize: 7.5,
      margin: [0, 0, 0, 8],
    },
    {
      text: `${summary.length} vessels · ${totals.cycles} cycles (${totals.complete} complete) · ${totals.fills} fills · ${data.exceptions.length} exceptions`,
      margin: [0, 0, 0, 8],
    },
    { text: 'Summary by vessel', fontSize: 12, color: ink, margin: [0, 4, 0, 4] },
    {
      table: {
        headerRows: 1,
        widths: [40, '*', 44, 40, 44, 30, 50, 78],
        body: [
          header(['Vessel', 'Name', 'Kind', 'Cycles', 'Complete', 'Fills', 'Exceptions', 'Last cycle']),
          ...summary.map((v): TableCell[] => [
            v.code,
            v.name,
            v.kind,
            String(v.cycles),
            String(v.complete),
            String(v.fills),
            { text: String(v.exceptions), color: v.exceptions ? danger : hop },
            v.lastCompletedAt ? f.when(v.lastCompletedAt) : '—',
          ]),
        ],
      },
      layout: compact,
    },
    data.exceptions.length
      ? headedTable(
          headingRow('Exceptions', 4, exceptionsHeading),
          ['Vessel', 'When', 'Exception', 'Detail'],
          [40, 80, 150, '*'],
          data.exceptions.map((e): TableCell[] => [
            e.vesselCode,
            { text: f.when(e.at), noWrap: true },
            { text: exceptionLabels[e.kind], color: danger, noWrap: true },
            e.message,
          ]),
          true,
        )
      : {
          stack: [
            { text: 'Exceptions', ...exceptionsHeading },
            { text: 'No exceptions in this period.', color: hop },
          ],
          unbreakable: true,
        },
  ];
}
