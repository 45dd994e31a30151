import { todayIn } from '../../../shared/billing/dates.ts';
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { sql } from 'kysely';
import { abv, abvMethod, litersToUsBarrels } from '../../../shared/brewing/index.ts';
import { productionRecordsNote, type ProductionMonth, type ProductionRecordRow, type ProductionRecords } from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { csvCell, XLSX_MONTH_FORMAT, xlsxCell, xlsxDate, type ExportCell } from '../../lib/export-cells.ts';
import { zonedTime } from './import-cells.ts';
import { monthlyProduction } from './production-report.ts';

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
  const grouped = await db
    .selectFrom('production_packaging as p')
    .innerJoin('batch as b', 'b.id', 'p.batch_id')
    .innerJoin('app_user as u', 'u.id', 'b.owner_id')
    .select([
      sql<string>`to_char(p.packaged_at at time zone ${timeZone}, 'YYYY-MM')`.as('month'),
      'b.id as batch_id',
      'b.name',
      'b.style',
      'u.name as owner_name',
      sql<number>`sum(p.liters)::float8`.as('liters'),
      sql<number>`count(*)::int`.as('packagings'),
    ])
    .where('p.packaged_at', '>=', period.start)
    .where('p.packaged_at', '<', period.end)
    .$if(Boolean(ownerId), (qb) => qb.where('b.owner_id', '=', ownerId!))
    .groupBy([sql`1`, 'b.id', 'b.name', 'b.style', 'u.name'])
    .orderBy(sql`1`)
    .orderBy('b.name')
    .execute();
  const ids = [...new Set(grouped.map((g) => g.batch_id))];
  const gravities = new Map<string, { og: number | null; fg: number | null }>();
  if (ids.length) {
    const rows = await sql<{ batch_id: string; og: string; fg: string; n: number }>`
      select batch_id,
             (array_agg(gravity_sg order by taken_at asc))[1] as og,
             (array_agg(gravity_sg order by taken_at desc))[1] as fg,
             count(*)::int as n
      from reading where batch_id = any(${ids}::uuid[]) group by batch_id`.execute(db);
    for (const r of rows.rows) gravities.set(r.batch_id, { og: Number(r.og), fg: r.n > 1 ? Number(r.fg) : null });
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

const columns = ['Month', 'Batch', 'Style', 'Member', 'Packaged (L)', 'US barrels (31 gal)', 'OG', 'FG', `ABV % (${abvMethod.name})`] as const;
const rowValues = (r: ProductionRecordRow) => [r.month, r.batchName, r.style, r.ownerName, r.packagedLiters, r.usBarrels, r.og, r.fg, r.abv];

/** The monthly report's columns: litres, then the main figures in US barrels (31 US gal). */
const monthlyColumns = [
  'Month',
  'Opening (L)',
  'Brewed (L)',
  'Packaged (L)',
  'Checked out (L)',
  'Served (L)',
  'Packaged otherwise (L)',
  'Removals (L)',
  'Transfer losses (L)',
  'Left in fermenter (L)',
  'Dumped kegs (L)',
  'Dumped batches (L)',
  'Losses (L)',
  'In fermenters (L)',
  'In kegs (L)',
  'Closing (L)',
  'Balance (L)',
  'Opening (US bbl)',
  'Brewed (US bbl)',
  'Removals (US bbl)',
  'Losses (US bbl)',
  'Closing (US bbl)',
] as const;
const monthlyValues = (m: ProductionMonth) => [
  m.month,
  m.openingLiters,
  m.producedLiters,
  m.packagedLiters,
  m.removals.checkedOutLiters,
  m.removals.servedLiters,
  m.removals.packagedOtherwiseLiters,
  m.removals.totalLiters,
  m.losses.transferLiters,
  m.losses.leftInFermenterLiters,
  m.losses.dumpedKegLiters,
  m.losses.dumpedBatchLiters,
  m.losses.totalLiters,
  m.closing.fermentersLiters,
  m.closing.kegsLiters,
  m.closing.totalLiters,
  m.balanceLiters,
  m.usBarrels.opening,
  m.usBarrels.produced,
  m.usBarrels.removals,
  m.usBarrels.losses,
  m.usBarrels.closing,
];

export function productionRecordsCsv(report: ProductionRecords): string {
  const data: ExportCell[][] = [
    [...columns],
    ...report.rows.map(rowValues),
    ['Total', `${report.totals.batches} batches`, '', '', report.totals.packagedLiters, report.totals.usBarrels, '', '', ''],
    [],
    ['Monthly report'],
    [...monthlyColumns],
    ...report.monthly.map(monthlyValues),
    [],
    ['Note', report.note, '', '', '', '', '', '', ''],
  ];
  // Batch names, styles and members' names are as typed: text that a spreadsheet would run is neutralised.
  return `\uFEFF${Papa.unparse(
    data.map((r) => r.map(csvCell)),
    { newline: '\r\n' },
  )}\r\n`;
}

export async function productionRecordsXlsx(report: ProductionRecords): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Cellarwright';
  const ws = wb.addWorksheet('Production records', { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = [
    { header: columns[0], key: 'month', width: 10, style: { numFmt: XLSX_MONTH_FORMAT } },
    { header: columns[1], key: 'batch', width: 28 },
    { header: columns[2], key: 'style', width: 20 },
    { header: columns[3], key: 'member', width: 22 },
    { header: columns[4], key: 'liters', width: 14, style: { numFmt: '0.00' } },
    { header: columns[5], key: 'bbl', width: 18, style: { numFmt: '0.0000' } },
    { header: columns[6], key: 'og', width: 9, style: { numFmt: '0.000' } },
    { header: columns[7], key: 'fg', width: 9, style: { numFmt: '0.000' } },
    { header: columns[8], key: 'abv', width: 9, style: { numFmt: '0.00' } },
  ];
  ws.getRow(1).font = { bold: true };
  // Months are date cells (their first day) shown as months.
  for (const r of report.rows) ws.addRow([xlsxDate(r.month), ...rowValues(r).slice(1).map(xlsxCell)]);
  const total = ws.addRow(['Total', `${report.totals.batches} batches`, '', '', report.totals.packagedLiters, report.totals.usBarrels]);
  total.font = { bold: true };
  ws.addRow([]);
  ws.addRow(['Note', xlsxCell(report.note)]);
  const months = wb.addWorksheet('By month');
  months.columns = [
    { header: 'Month', key: 'month', width: 10, style: { numFmt: XLSX_MONTH_FORMAT } },
    { header: 'Batches', key: 'batches', width: 10 },
    { header: 'Packaged (L)', key: 'liters', width: 14, style: { numFmt: '0.00' } },
    { header: 'US barrels (31 gal)', key: 'bbl', width: 18, style: { numFmt: '0.0000' } },
  ];
  months.getRow(1).font = { bold: true };
  for (const m of report.months) months.addRow([xlsxDate(m.month), m.batches, m.packagedLiters, m.usBarrels]);
  const monthly = wb.addWorksheet('Monthly report', { views: [{ state: 'frozen', ySplit: 1, xSplit: 1 }] });
  monthly.columns = monthlyColumns.map((header, i) => ({
    header,
    key: `c${i}`,
    width: i === 0 ? 10 : Math.max(12, header.length + 2),
    style: i === 0 ? { numFmt: XLSX_MONTH_FORMAT } : { numFmt: header.includes('bbl') ? '0.0000' : '0.00' },
  }));
  monthly.getRow(1).font = { bold: true };
  for (const m of report.monthly) monthly.addRow([xlsxDate(m.month), ...monthlyValues(m).slice(1).map(xlsxCell)]);
  monthly.addRow([]);
  monthly.addRow(['Note', xlsxCell(report.note)]);
  return Buffer.from(await wb.xlsx.writeBuffer());
}
