import type { Content } from 'pdfmake/interfaces';
import { beerFacts, bestBeforeState, type FiningsDose } from '../../../shared/cellar/trace.ts';
import { alcoholCaution, pressureCautions } from '../../../shared/cellar/cautions.ts';
import type { BatchTrace, TraceFill, TraceReport } from '../../../shared/schemas/trace.ts';
import type { Database } from '../../db/database.ts';
import type { BatchStatus } from '../../db/tables/batches.ts';
import { csvTable, type Column } from '../../lib/tabular-export.ts';
import { defaultLocale, formatDate, formatNumber, formatVolume, type FormatContext } from '../../../shared/format/index.ts';
import { renderPdf } from '../../lib/pdf.ts';
import { framedDocument, pdfColours, type PdfCoop } from '../../lib/pdf-frame.ts';
import { loadShelfLifeSettings } from './shelf-life.ts';
import { batchIdsFilledIn, finingsRows, kegOutings, traceBatches, traceFillRows, type FillScope } from './trace.repository.ts';

const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const round2 = (v: number) => Math.round(v * 100) / 100;

/** Who is looking: holders' names only for those who may see them (or the holder themself). */
export interface TraceViewer {
  id: string;
  mayNameHolder: (memberId: string) => boolean;
}

async function loadFills(db: Database, scope: FillScope, viewer: TraceViewer, now: Date, nearDays: number): Promise<Map<string, TraceFill[]>> {
  const out = new Map<string, TraceFill[]>();
  if (!scope.batchIds.length) return out;
  const rows = await traceFillRows(db, scope, now);
  if (!rows.length) return out;

  // Who took each keg out, and which taps it was on, while it held this fill.
  const movements = await kegOutings(db, [...new Set(rows.map((r) => r.keg_id))]);

  for (const r of rows) {
    const open = r.emptied_at === null;
    const start = new Date(r.filled_at).getTime();
    const end = r.emptied_at ? new Date(r.emptied_at).getTime() : Infinity;
    const during = movements.filter((m) => m.keg_id === r.keg_id && new Date(m.at).getTime() >= start && new Date(m.at).getTime() < end);
    const finings: FiningsDose[] = r.finings_kind ? [{ kind: r.finings_kind, dose: Number(r.finings_amount), unit: r.finings_unit ?? '' }] : [];
    const named = (id: string | null) => Boolean(id && viewer.mayNameHolder(id));
    const fill: TraceFill = {
      fillId: r.id,
      kegId: r.keg_id,
      code: r.code,
      filledAt: iso(r.filled_at)!,
      volumeLiters: Number(r.volume_liters),
      remainingLiters: Number(r.remaining_liters),
      holdsBatch: open,
      emptiedAt: iso(r.emptied_at),
      state: r.state,
      whereabouts: r.whereabouts,
      // Whereabouts says "with a member"; who, only for those who may know.
      holder: open && r.member_id && named(r.member_id) ? { id: r.member_id, name: r.member_name ?? '' } : null,
      dueAt: open ? iso(r.due_at) : null,
      tap:
        open && r.tap_id
          ? { id: r.tap_id, code: r.tap_code ?? '', name: r.tap_name ?? '', position: ((r.tap_attributes ?? {}) as { position?: string }).position ?? null }
          : null,
      bestBefore: iso(r.best_before),
      bestBeforeState: r.best_before && open ? bestBeforeState(r.best_before, now, nearDays) : null,
      finings,
      takenBy: during
        .filter((m) => m.action === 'checked_out')
        .map((m) => ({
          memberId: named(m.member_id) ? m.member_id : null,
          name: named(m.member_id) ? (m.member_name ?? null) : null,
          at: iso(m.at)!,
          dueAt: iso(m.due_at),
        })),
      servedOn: during.filter((m) => m.action === 'tapped' && m.tap_id).map((m) => ({ tapId: m.tap_id!, code: m.tap_code ?? '', at: iso(m.at)! })),
    };
    const list = out.get(r.batch_id) ?? [];
    list.push(fill);
    out.set(r.batch_id, list);
  }
  return out;
}

interface TraceBatchRow {
  id: string;
  name: string;
  style: string;
  status: BatchStatus;
  owner_id: string;
  owner_name: string;
  packaged_at: Date | null;
  packaged_liters: unknown;
  shelf_life_days: number | null;
  allergens: string[];
}

function batchTraceOf(b: TraceBatchRow, fills: TraceFill[], finings: FiningsDose[]): BatchTrace {
  const facts = beerFacts(b.allergens ?? [], finings);
  return {
    batch: {
      id: b.id,
      name: b.name,
      style: b.style,
      status: b.status,
      ownerId: b.owner_id,
      ownerName: b.owner_name,
      packagedAt: iso(b.packaged_at),
      packagedLiters: num(b.packaged_liters),
      shelfLifeDays: b.shelf_life_days,
    },
    fills,
    finings: facts.finings,
    allergens: facts.allergens,
    vegan: facts.vegan,
    totals: {
      kegs: fills.length,
      liters: round2(fills.reduce((s, f) => s + f.volumeLiters, 0)),
      holding: fills.filter((f) => f.holdsBatch).length,
      withMembers: fills.filter((f) => f.holdsBatch && f.whereabouts === 'with_member').length,
      onTaps: fills.filter((f) => f.holdsBatch && f.tap).length,
    },
  };
}

/** Every transfer's finings of these batches, oldest first. */
async function loadFinings(db: Database, batchIds: string[]): Promise<Map<string, FiningsDose[]>> {
  const out = new Map<string, FiningsDose[]>();
  if (!batchIds.length) return out;
  for (const r of await finingsRows(db, batchIds)) {
    const list = out.get(r.batch_id) ?? [];
    list.push({ kind: r.finings_kind!, dose: Number(r.finings_amount), unit: r.finings_unit ?? '' });
    out.set(r.batch_id, list);
  }
  return out;
}

/** Every keg a batch went into and where each is now, with what the beer carries (allergens, vegan, best-before). */
export async function batchTrace(db: Database, batchId: string, viewer: TraceViewer, now: Date): Promise<BatchTrace> {
  const settings = await loadShelfLifeSettings(db);
  const [b, fills, finings] = await Promise.all([
    traceBatches(db).where('b.id', '=', batchId).executeTakeFirstOrThrow(),
    loadFills(db, { batchIds: [batchId] }, viewer, now, settings.nearDays),
    loadFinings(db, [batchId]),
  ]);
  return batchTraceOf(b, fills.get(batchId) ?? [], finings.get(batchId) ?? []);
}

const dayStart = (d: string) => new Date(`${d}T00:00:00Z`);

/** Every fill made in [from, to] (whole UTC days), by batch; `ownerId` limits it to one member's batches. */
export async function traceReport(
  db: Database,
  q: { from: string; to: string; ownerId?: string | undefined },
  viewer: TraceViewer,
  now: Date,
): Promise<TraceReport> {
  const from = dayStart(q.from);
  const to = new Date(dayStart(q.to).getTime() + 86_400_000);
  const batchIds = await batchIdsFilledIn(db, from, to, q.ownerId);
  const settings = await loadShelfLifeSettings(db);
  const [batches, fills, finings] = await Promise.all([
    batchIds.length ? traceBatches(db).where('b.id', 'in', batchIds).execute() : Promise.resolve([]),
    loadFills(db, { batchIds, from, to }, viewer, now, settings.nearDays),
    loadFinings(db, batchIds),
  ]);
  const traces = batches.map((b) => batchTraceOf(b as TraceBatchRow, fills.get(b.id) ?? [], finings.get(b.id) ?? []));
  traces.sort((a, b) => a.fills[0]!.filledAt.localeCompare(b.fills[0]!.filledAt) || a.batch.name.localeCompare(b.batch.name));
  return { from: q.from, to: q.to, generatedAt: now.toISOString(), batches: traces };
}

// ---------------------------------------------------------------------------------------------
// CSV and PDF: one row per keg fill.
// ---------------------------------------------------------------------------------------------

const whereLabel: Record<string, string> = { cellar: 'cellar', cold_room: 'cold room', with_member: 'with a member', missing: 'missing' };
const dosesText = (f: FiningsDose[]) => f.map((d) => `${d.kind} ${d.dose} ${d.unit}`.trim()).join('; ');
const day = (v: string | null | undefined) => (v ? v.slice(0, 10) : '');

type FillRow = { t: BatchTrace; f: TraceFill };
const csvColumns: Column<FillRow>[] = [
  { header: 'Batch', value: ({ t }) => t.batch.name },
  { header: 'Style', value: ({ t }) => t.batch.style },
  { header: 'Owner', value: ({ t }) => t.batch.ownerName },
  { header: 'Allergens', value: ({ t }) => t.allergens.join('; ') },
  { header: 'Vegan', value: ({ t }) => (t.vegan ? 'yes' : 'no') },
  { header: 'Keg', value: ({ f }) => f.code },
  { header: 'Filled', value: ({ f }) => f.filledAt },
  { header: 'Litres filled', value: ({ f }) => f.volumeLiters, type: 'number' },
  { header: 'Litres left', value: ({ f }) => f.remainingLiters, type: 'number' },
  { header: 'Best before', value: ({ f }) => day(f.bestBefore) },
  { header: 'Finings', value: ({ f }) => dosesText(f.finings) },
  { header: 'Holds this beer now', value: ({ f }) => (f.holdsBatch ? 'yes' : 'no') },
  { header: 'Where now', value: ({ f }) => (f.holdsBatch ? (whereLabel[f.whereabouts] ?? f.whereabouts) : '') },
  { header: 'Holder', value: ({ f }) => f.holder?.name ?? '' },
  { header: 'Due back', value: ({ f }) => day(f.dueAt) },
  { header: 'Tap now', value: ({ f }) => f.tap?.code ?? '' },
  { header: 'Taken out by', value: ({ f }) => f.takenBy.map((m) => `${m.name ?? 'a member'} ${day(m.at)}`).join('; ') },
  { header: 'Served on taps', value: ({ f }) => f.servedOn.map((s) => `${s.code} ${day(s.at)}`).join('; ') },
  { header: 'Emptied', value: ({ f }) => f.emptiedAt ?? '' },
];

/** The trace as CSV, one row per keg fill; text as typed is neutralised (backend/lib/tabular-export.ts). */
export function traceCsv(traces: BatchTrace[]): string {
  return csvTable({ columns: csvColumns, rows: traces.flatMap((t) => t.fills.map((f) => ({ t, f }))) });
}

const { muted } = pdfColours;

function batchBlock(t: BatchTrace, ctx: FormatContext): Content[] {
  const day = (v: string | null | undefined) => (v ? formatDate(v, ctx) : '');
  const header = ['Keg', 'Filled', 'L', 'Left', 'Best before', 'Now', 'Holder / tap', 'Taken out by', 'Served on'].map((text) => ({
    text,
    color: muted,
    fontSize: 7,
  }));
  const body = t.fills.map((f) => [
    f.code,
    day(f.filledAt),
    formatNumber(f.volumeLiters, 1, ctx),
    formatNumber(f.remainingLiters, 1, ctx),
    `${day(f.bestBefore)}${f.bestBeforeState === 'past' ? ' (past)' : f.bestBeforeState === 'near' ? ' (near)' : ''}`,
    f.holdsBatch ? (whereLabel[f.whereabouts] ?? f.whereabouts) : `emptied ${day(f.emptiedAt)}`,
    [f.holder?.name, f.tap ? `tap ${f.tap.code}` : ''].filter(Boolean).join(' · '),
    f.takenBy.map((m) => `${m.name ?? 'a member'} ${day(m.at)}`).join('\n'),
    f.servedOn.map((s) => `${s.code} ${day(s.at)}`).join('\n'),
  ]);
  return [
    { text: `${t.batch.name}${t.batch.style ? ` · ${t.batch.style}` : ''}`, fontSize: 12, margin: [0, 12, 0, 2] },
    {
      text: [
        { text: 'Owner ', color: muted },
        t.batch.ownerName,
        { text: '   Allergens ', color: muted },
        t.allergens.length ? t.allergens.join(', ') : 'none noted',
        { text: '   Vegan ', color: muted },
        t.vegan ? 'yes' : 'no',
        { text: '   Finings ', color: muted },
        t.finings.length ? dosesText(t.finings) : 'none',
      ],
    },
    {
      text: `${t.totals.kegs} keg${t.totals.kegs === 1 ? '' : 's'}, ${formatVolume(t.totals.liters, ctx)}; ${t.totals.holding} still holding it (${t.totals.withMembers} with members, ${t.totals.onTaps} on taps).`,
      color: muted,
      margin: [0, 2, 0, 4],
    },
    t.fills.length
      ? {
          table: { headerRows: 1, widths: ['auto', 'auto', 'auto', 'auto', 'auto', 'auto', '*', '*', 'auto'], body: [header, ...body] },
          layout: 'lightHorizontalLines',
        }
      : { text: 'No kegs filled.', color: muted },
  ];
}

/** The trace as a PDF (one batch, or every batch filled in a date range), in the one PDF frame. */
export function tracePdf(title: string, subtitle: string, traces: BatchTrace[], now: Date, coop: PdfCoop): Promise<Buffer> {
  const ctx: FormatContext = { locale: defaultLocale, timeZone: coop.timeZone, units: 'metric' };
  return renderPdf(
    framedDocument({
      coop,
      title,
      producedAt: now,
      density: 'report',
      pageOrientation: 'landscape',
      cautions: [...pressureCautions, alcoholCaution],
      content: [
        { text: subtitle, color: muted, margin: [0, 10, 0, 0] },
        ...(traces.length ? traces.flatMap((t) => batchBlock(t, ctx)) : [{ text: 'No kegs were filled in this range.', margin: [0, 12, 0, 0] } as Content]),
        {
          text: 'Allergens are the batch’s own notes and what its finings add (gelatin and isinglass are animal-derived, so not vegan; silica finings are vegan: common practice). Labels and recalls: local food rules govern what must be declared.',
          color: muted,
          margin: [0, 14, 0, 0],
        },
      ],
    }),
  );
}
