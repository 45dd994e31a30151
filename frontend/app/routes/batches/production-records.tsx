import { useState } from 'react';
import { Link } from 'react-router-dom';
import { PageHeader } from '@/components/layouts/page-header';
import { EmptyRow, figureHead, TableHead } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { Spinner } from '@/components/ui/spinner';
import { parentPages, paths } from '@/config/paths';
import { productionRecordsExportHref, useProductionRecords } from '@/features/batches/api/get-production-records';
import { formatPercent, formatSg } from '@/features/batches/components/gravity-format';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { abvMethod } from '../../../../shared/brewing/index.ts';
import type { ProductionMonth, ProductionRecordRow, ProductionRecords } from '../../../../shared/schemas/batches.ts';
import { formatMonth } from '@/utils/format';
import { ProductionChart } from '@/features/batches/components/production-chart';
import { ScrollRegion } from '@/components/ui/scroll-region';

const month = (offset: number) => {
  const d = new Date();
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + offset, 1)).toISOString().slice(0, 7);
};
const recordsIntro = "Each month's brewing, removals, losses and month-end inventory; volumes packaged and alcohol by volume per batch.";
const exportsOf = (from: string, to: string) => [
  { label: 'Export CSV', href: productionRecordsExportHref(from, to, 'csv') },
  { label: 'Export XLSX', href: productionRecordsExportHref(from, to, 'xlsx') },
];
const bbl = (v: number) => v.toFixed(3);
const batchHead = ['Month', 'Batch', 'Style', 'Member', 'Packaged (L)', 'US bbl', 'OG', 'FG', `ABV (${abvMethod.name})`];
const monthLabel = (m: string) => formatMonth(m);

/** Volumes packaged and ABV per batch and month, in litres and US barrels, for the records licensing and excise rules ask for. */
const ProductionRecordsRoute = () => {
  useDocumentTitle('Production records');
  const ability = useAppAbility();
  const units = useUnits();
  const [from, setFrom] = useState(() => month(-3));
  const [to, setTo] = useState(() => month(0));
  const valid = /^\d{4}-\d{2}$/.test(from) && /^\d{4}-\d{2}$/.test(to) && from <= to;
  const records = useProductionRecords(valid ? from : month(-3), valid ? to : month(0));
  const canExport = ability.can('export', 'ProductionRecord');
  const data = records.data;
  return (
    <div className="flex flex-col gap-4">
      <PageHeader
        parent={parentPages.batches}
        title="Production records"
        intro={recordsIntro}
        report
        downloads={canExport && valid ? exportsOf(from, to) : []}
      />
      <Alert tone="info">{data?.note ?? 'Local licensing and excise rules govern which production records must be kept.'}</Alert>
      <div className="flex flex-wrap items-end gap-3">
        <Field label="From month">{(c) => <Input {...c} type="month" value={from} onChange={(e) => setFrom(e.target.value)} className="w-44" />}</Field>
        <Field label="To month" error={valid ? undefined : 'Pick a “to” month on or after the “from” month'}>
          {(c) => <Input {...c} type="month" value={to} onChange={(e) => setTo(e.target.value)} className="w-44" />}
        </Field>
        {records.isFetching ? <Spinner className="mb-3 size-4 text-copper" /> : null}
      </div>
      {records.isError ? <Alert tone="error">{problemMessage(records.error)}</Alert> : null}
      {data ? (
        <>
          <dl className="flex flex-wrap gap-3 text-sm">
            <div className="rounded-md border border-line bg-surface px-3 py-2">
              <dt className="text-xs text-ink-muted uppercase">Batches</dt>
              <dd className="text-xl font-semibold">{data.totals.batches}</dd>
            </div>
            <div className="rounded-md border border-line bg-surface px-3 py-2">
              <dt className="text-xs text-ink-muted uppercase">Packaged</dt>
              <dd className="text-xl font-semibold tabular-nums">{data.totals.packagedLiters.toFixed(1)} L</dd>
              {units.units === 'us' ? <dd className="text-xs text-ink-muted">{units.volume(data.totals.packagedLiters)}</dd> : null}
            </div>
            <div className="rounded-md border border-line bg-surface px-3 py-2">
              <dt className="text-xs text-ink-muted uppercase">US barrels (31 gal)</dt>
              <dd className="text-xl font-semibold tabular-nums">{bbl(data.totals.usBarrels)}</dd>
            </div>
          </dl>
          <MonthlyReport months={data.monthly} />
          <h2 className="text-lg">Packaged per batch</h2>
          <ScrollRegion label="Production records by month and batch" className="max-h-[65dvh] overflow-auto rounded-md border border-line bg-surface">
            <table className="w-full border-separate border-spacing-0 text-sm">
              <caption className="sr-only">Production records by month and batch</caption>
              <TableHead
                cells={batchHead}
                cellClassName="sticky top-0 border-b border-line-strong bg-ground-deep px-3 py-2 text-left text-xs font-semibold text-ink-muted uppercase"
              />
              <tbody>
                {data.rows.length === 0 ? <EmptyRow colSpan={9}>Nothing packaged in these months.</EmptyRow> : null}
                {data.months.map((m) => (
                  <MonthRows key={m.month} month={m} rows={data.rows.filter((r) => r.month === m.month)} />
                ))}
              </tbody>
            </table>
          </ScrollRegion>
        </>
      ) : null}
    </div>
  );
};

const td = 'border-b border-line px-3 py-1.5';
const MonthRows = ({ month: m, rows }: { month: ProductionRecords['months'][number]; rows: ProductionRecordRow[] }) => (
  <>
    {rows.map((r) => (
      <tr key={`${m.month}-${r.batchId}`}>
        <td className={`${td} whitespace-nowrap text-ink-muted`}>{monthLabel(m.month)}</td>
        <td className={td}>
          <Link to={`${paths.batches}/${r.batchId}`}>{r.batchName}</Link>
        </td>
        <td className={td}>{r.style}</td>
        <td className={`${td} whitespace-nowrap`}>{r.ownerName}</td>
        <td className={`${td} text-right tabular-nums`}>{r.packagedLiters.toFixed(1)}</td>
        <td className={`${td} text-right tabular-nums`}>{bbl(r.usBarrels)}</td>
        <td className={`${td} tabular-nums`}>{formatSg(r.og)}</td>
        <td className={`${td} tabular-nums`}>{formatSg(r.fg)}</td>
        <td className={`${td} text-right tabular-nums`}>{formatPercent(r.abv, 2)}</td>
      </tr>
    ))}
    <tr className="bg-ground font-semibold">
      <td className={td} colSpan={4}>
        {monthLabel(m.month)}: {m.batches} batch{m.batches === 1 ? '' : 'es'}
      </td>
      <td className={`${td} text-right tabular-nums`}>{m.packagedLiters.toFixed(1)}</td>
      <td className={`${td} text-right tabular-nums`}>{bbl(m.usBarrels)}</td>
      <td className={td} colSpan={3} />
    </tr>
  </>
);

const litres = (v: number) => v.toFixed(1);
const thBase = 'sticky top-0 border-b border-line-strong bg-ground-deep px-2 py-2 text-xs font-semibold text-ink-muted uppercase';
const monthHead = [
  { label: 'Month', className: 'text-left' },
  ...['Opening', 'Brewed', 'Packaged', 'Removals', 'Losses', 'In fermenters', 'In kegs', 'Closing', 'Balance', 'Closing US bbl'].map((h) => figureHead(h)),
];

/** The monthly report: opening + brewed − removals − losses = closing, per month, litres and US barrels. */
const MonthlyReport = ({ months }: { months: ProductionMonth[] }) => (
  <section aria-labelledby="monthly-title" className="flex flex-col gap-2">
    <h2 id="monthly-title" className="text-lg">
      Monthly report
    </h2>
    <p className="text-sm text-ink-muted">
      Removals are kegs checked out to members and kegs emptied at the co-op (served); losses are transfer losses, what stayed in the fermenter, dumped kegs and
      discarded batches. Inventory is the beer in fermenters and in kegs still at the co-op.
    </p>
    {months.length > 1 ? <ProductionChart months={months} /> : null}
    <ScrollRegion label="Monthly production report" className="overflow-auto rounded-md border border-line bg-surface">
      <table className="w-full border-separate border-spacing-0 text-sm">
        <caption className="sr-only">Monthly production report, litres</caption>
        <TableHead cells={monthHead} cellClassName={thBase} />
        <tbody>
          {months.map((m) => (
            <tr key={m.month}>
              <th scope="row" className={`${td} whitespace-nowrap text-left font-normal text-ink-muted`}>
                {monthLabel(m.month)}
              </th>
              <td className={`${td} text-right tabular-nums`}>{litres(m.openingLiters)}</td>
              <td className={`${td} text-right tabular-nums`}>{litres(m.producedLiters)}</td>
              <td className={`${td} text-right tabular-nums text-ink-muted`}>{litres(m.packagedLiters)}</td>
              <td
                className={`${td} text-right tabular-nums`}
                title={`Checked out ${litres(m.removals.checkedOutLiters)} L · served ${litres(m.removals.servedLiters)} L · packaged otherwise ${litres(m.removals.packagedOtherwiseLiters)} L`}
              >
                {litres(m.removals.totalLiters)}
              </td>
              <td
                className={`${td} text-right tabular-nums`}
                title={`Transfers ${litres(m.losses.transferLiters)} L · left in fermenter ${litres(m.losses.leftInFermenterLiters)} L · dumped kegs ${litres(m.losses.dumpedKegLiters)} L · discarded batches ${litres(m.losses.dumpedBatchLiters)} L`}
              >
                {litres(m.losses.totalLiters)}
              </td>
              <td className={`${td} text-right tabular-nums`}>{litres(m.closing.fermentersLiters)}</td>
              <td className={`${td} text-right tabular-nums`}>{litres(m.closing.kegsLiters)}</td>
              <td className={`${td} text-right font-semibold tabular-nums`}>{litres(m.closing.totalLiters)}</td>
              <td className={`${td} text-right tabular-nums ${m.balanceLiters === 0 ? 'text-hop-strong' : 'text-danger-strong'}`}>
                {m.balanceLiters === 0 ? 'balances' : litres(m.balanceLiters)}
              </td>
              <td className={`${td} text-right tabular-nums`}>{bbl(m.usBarrels.closing)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </ScrollRegion>
    <p className="text-xs text-ink-muted">
      Litres; each month opening + brewed − removals − losses = closing. US barrels of 31 US gallons (117.35 L). Packaging moves beer from fermenters into kegs
      within the inventory. The CSV and XLSX downloads give every figure in detail.
    </p>
  </section>
);

export default ProductionRecordsRoute;
