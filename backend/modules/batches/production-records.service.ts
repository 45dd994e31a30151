import { todayIn } from '../../../shared/billing/dates.ts';
import { abv, abvMethod, litersToUsBarrels } from '../../../shared/brewing/index.ts';
import { productionRecordsNote, type ProductionMonth, type ProductionRecordRow, type ProductionRecords } from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { csvFile, csvRows, xlsxFile, type Column, type Table } from '../../lib/tabular-export.ts';
import { zonedTime } from './import-cells.ts';
import { monthlyProduction } from './production-report.ts';
import { firstAndLastGravity, packagedByMonth } from './production-records.repository.ts';

/** Month or day bounds in the co-op's time zone → [start, end) instants. `to` is inclusive: a whole month or day. */
export function periodBounds(
  from: string | undefined,
  to: string | undefined,
  timeZone: string,
  now: Date,
): { start: Date; end: Date; from: string; to: string } {
  const parts = (s: string) => s.split('-').map(Number) as [number, number, number?];
  const startOf = (s: string) => {
    const [y, m, d] = parts(s);
    return new Date(zonedTime(y, m, d ?? 1, 0, 0, 0, 0, timeZone));
  };
  const endOf = (s: string) => {
    const [y, m, d] = parts(s);
    const next = d === undefined ? new Date(Date.UTC(y, m, 1)) : new Date(Date.UTC(y, m - 1, d + 1));
    return new Date(zonedTime(next.getUTCFullYear(), next.getUTCMonth() + 1, next.getUTCDate(), 0, 0, 0, 0, timeZone));
  };
  // By default the twelve months up to this one, in the co-op's calendar.
  const defaultTo = todayIn(timeZone, now).slice(0, 7);
  const [ty, tm] = defaultTo.split('-').map(Number) as [number, number];
  const defaultFrom = new Date(Date.UTC(ty, tm - 12, 1)).toISOString().slice(0, 7);
  const f = from ?? defaultFrom;
  const t = to ?? defaultTo;
  return { start: startOf(f), end: endOf(t), from: f, to: t };
}

const round = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d;

/**
 * Volumes packaged per batch and month (from the `production_packaging` view), in litres and US
 * barrels (31 US gal), with each batch's OG (first reading), FG (last reading) and ABV (F4.6).
 */
export async function productionRecords(
  db: Database,
  { from, to, ownerId, timeZone = 'UTC', now }: { from?: string; to?: string; ownerId?: string; timeZone?: string; now: Date },
): Promise<ProductionRecords> {
  const period = periodBounds(from, to, timeZone, now);
  if (period.end <= period.start) {
    return {
      from: period.from,
      to: period.to,
      rows: [],
      months: [],
      totals: { batches: 0, packagedLiters: 0, usBarrels: 0 },
      monthly: [],
      note: productionRecordsNote,
    };
  }
  // Every month of the period, whole, for the monthly report.
  const monthList: { month: string; start: Date; end: Date }[] = [];
  for (let m = period.from.slice(0, 7); m <= period.to.slice(0, 7) && monthList.length < 120;) {
    const b = periodBounds(m, m, timeZone, now);
    monthList.push({ month: m, start: b.start, end: b.end });
    const [y, mo] = m.split('-').map(Number) as [number, number];
    m = new Date(Date.UTC(y, mo, 1)).toISOString().slice(0, 7);
  }
  const monthly = await monthlyProduction(db, monthList, ownerId);
  const grouped = await packagedByMonth(db, period, timeZone, ownerId);
  const ids = [...new Set(grouped.map((g) => g.batch_id))];
  const gravities = new Map<string, { og: number | null; fg: number | null }>();
  if (ids.length) {
    for (const r of await firstAndLastGravity(db, ids)) gravities.set(r.batch_id, { og: Number(r.og), fg: r.n > 1 ? Number(r.fg) : null });
  }
  const out: ProductionRecordRow[] = grouped.map((g) => {
    const gr = gravities.get(g.batch_id) ?? { og: null, fg: null };
    let a: number | null = null;
    if (gr.og !== null && gr.fg !== null && gr.og > 1 && gr.fg <= gr.og) {
      try {
        a = round(abv(gr.og, gr.fg), 4);
      } catch {
        a = null;
      }
    }
    const liters = Number(g.liters);
    return {
      month: g.month,
      batchId: g.batch_id,
      batchName: g.name,
      style: g.style,
      ownerName: g.owner_name,
      packagedLiters: round(liters, 2),
      usBarrels: round(litersToUsBarrels(liters), 4),
      og: gr.og,
      fg: gr.fg,
      abv: a,
      packagings: g.packagings,
    };
  });
  const months = new Map<string, { month: string; batches: number; liters: number }>();
  for (const r of out) {
    const m = months.get(r.month) ?? { month: r.month, batches: 0, liters: 0 };
    m.batches += 1;
    m.liters += r.packagedLiters;
    months.set(r.month, m);
  }
  const totalLiters = out.reduce((s, r) => s + r.packagedLiters, 0);
  return {
    from: period.from,
    to: period.to,
    rows: out,
    months: [...months.values()].map((m) => ({
      month: m.month,
      batches: m.batches,
      packagedLiters: round(m.liters, 2),
      usBarrels: round(litersToUsBarrels(m.liters), 4),
    })),
    totals: { batches: new Set(out.map((r) => r.batchId)).size, packagedLiters: round(totalLiters, 2), usBarrels: round(litersToUsBarrels(totalLiters), 4) },
    monthly,
    note: productionRecordsNote,
  };
}

const abvHeader = `ABV % (${abvMethod.name})`;
const recordColumns: Column<ProductionRecordRow>[] = [
  { header: 'Month', value: (r) => r.month, type: 'month', width: 10 },
  { header: 'Batch', value: (r) => r.batchName, width: 28 },
  { header: 'Style', value: (r) => r.style, width: 20 },
  { header: 'Member', value: (r) => r.ownerName, width: 22 },
  { header: 'Packaged (L)', value: (r) => r.packagedLiters, type: 'number', numFmt: '0.00', width: 14 },
  { header: 'US barrels (31 gal)', value: (r) => r.usBarrels, type: 'number', numFmt: '0.0000', width: 18 },
  { header: 'OG', value: (r) => r.og, type: 'number', numFmt: '0.000', width: 9 },
  { header: 'FG', value: (r) => r.fg, type: 'number', numFmt: '0.000', width: 9 },
  { header: abvHeader, value: (r) => r.abv, type: 'number', numFmt: '0.00', width: 9 },
];

/** A group of the monthly report's figures: a column for each of its parts, in this order. */
function figureGroup<K extends string>(unit: string, labels: Partial<Record<NoInfer<K>, string>>, part: (m: ProductionMonth) => Record<K, number>) {
  return (Object.entries(labels) as [K, string][]).map(([key, label]): [string, (m: ProductionMonth) => number] => [`${label} (${unit})`, (m) => part(m)[key]]);
}

/** The monthly report's columns: litres, then the main figures in US barrels (31 US gal). */
const monthlyFigures: [string, (m: ProductionMonth) => number][] = [
  ['Opening (L)', (m) => m.openingLiters],
  ['Brewed (L)', (m) => m.producedLiters],
  ['Packaged (L)', (m) => m.packagedLiters],
  ...figureGroup(
    'L',
    { checkedOutLiters: 'Checked out', servedLiters: 'Served', packagedOtherwiseLiters: 'Packaged otherwise', totalLiters: 'Removals' },
    (m) => m.removals,
  ),
  ...figureGroup(
    'L',
    {
      transferLiters: 'Transfer losses',
      leftInFermenterLiters: 'Left in fermenter',
      dumpedKegLiters: 'Dumped kegs',
      dumpedBatchLiters: 'Dumped batches',
      totalLiters: 'Losses',
    },
    (m) => m.losses,
  ),
  ...figureGroup('L', { fermentersLiters: 'In fermenters', kegsLiters: 'In kegs', totalLiters: 'Closing' }, (m) => m.closing),
  ['Balance (L)', (m) => m.balanceLiters],
  ...figureGroup('US bbl', { opening: 'Opening', produced: 'Brewed', removals: 'Removals', losses: 'Losses', closing: 'Closing' }, (m) => m.usBarrels),
];
const monthlyColumns: Column<ProductionMonth>[] = [
  { header: 'Month', value: (m) => m.month, type: 'month', width: 10 },
  ...monthlyFigures.map(([header, value]): Column<ProductionMonth> => ({
    header,
    value,
    type: 'number',
    numFmt: header.includes('bbl') ? '0.0000' : '0.00',
    width: Math.max(12, header.length + 2),
  })),
];

/** The report's tables, each with what follows it (a total, the note): batch names, styles and members' names are as typed. */
function recordTables(report: ProductionRecords) {
  const note = { cells: ['Note', report.note] };
  const records: Table<ProductionRecordRow> = {
    name: 'Production records',
    columns: recordColumns,
    rows: report.rows,
    after: [
      { cells: ['Total', `${report.totals.batches} batches`, '', '', report.totals.packagedLiters, report.totals.usBarrels], bold: true },
      { cells: [] },
      note,
    ],
  };
  const byMonth: Table<ProductionRecords['months'][number]> = {
    name: 'By month',
    columns: [
      { header: 'Month', value: (m) => m.month, type: 'month', width: 10 },
      { header: 'Batches', value: (m) => m.batches, type: 'number', width: 10 },
      { header: 'Packaged (L)', value: (m) => m.packagedLiters, type: 'number', numFmt: '0.00', width: 14 },
      { header: 'US barrels (31 gal)', value: (m) => m.usBarrels, type: 'number', numFmt: '0.0000', width: 18 },
    ],
    rows: report.months,
    frozenHeader: false,
  };
  const monthly: Table<ProductionMonth> = {
    name: 'Monthly report',
    columns: monthlyColumns,
    rows: report.monthly,
    frozenColumns: 1,
    after: [{ cells: [] }, note],
  };
  return { records, byMonth, monthly };
}

export function productionRecordsCsv(report: ProductionRecords): string {
  const { records, monthly } = recordTables(report);
  return csvFile([
    ...csvRows({ ...records, after: records.after?.slice(0, 1) }),
    [],
    ['Monthly report'],
    ...csvRows({ ...monthly, after: [] }),
    [],
    ['Note', report.note, '', '', '', '', '', '', ''],
  ]);
}

export function productionRecordsXlsx(report: ProductionRecords): Promise<Buffer> {
  const { records, byMonth, monthly } = recordTables(report);
  return xlsxFile([records, byMonth, monthly]);
}
