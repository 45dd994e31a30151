import { useState } from 'react';
import { Link } from 'react-router-dom';
import { PageHeader } from '@/components/layouts/page-header';
import { Alert } from '@/components/ui/alert';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { Spinner } from '@/components/ui/spinner';
import { parentPages, paths } from '@/config/paths';
import { traceReportHref, useTraceReport } from '@/features/batches/api/get-trace';
import { TraceFacts, TraceTable } from '@/features/batches/components/trace-view';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { problemMessage } from '@/lib/api-client';
import { pluralize } from '@/utils/format';

const dayOffset = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);
const isDay = (v: string) => /^\d{4}-\d{2}-\d{2}$/.test(v);

/** The trace report: every keg filled in a date range, by batch, and where each is now (a recall in one place). */
const TraceReportRoute = () => {
  useDocumentTitle('Trace report');
  const [from, setFrom] = useState(() => dayOffset(-90));
  const [to, setTo] = useState(() => dayOffset(0));
  const valid = isDay(from) && isDay(to) && from <= to;
  const report = useTraceReport(valid ? from : dayOffset(-90), valid ? to : dayOffset(0));
  return (
    <div className="flex flex-col gap-4">
      <PageHeader
        parent={parentPages.batches}
        title="Trace report"
        intro="Every keg filled in the range, by batch: where each is now, who has it and which tap served it."
        report
        downloads={
          valid
            ? [
                { label: 'Export CSV', href: traceReportHref(from, to, 'csv') },
                { label: 'PDF', href: traceReportHref(from, to, 'pdf'), open: true },
              ]
            : []
        }
      />
      <div className="flex flex-wrap items-end gap-3">
        <Field label="Filled from">{(c) => <Input {...c} type="date" value={from} onChange={(e) => setFrom(e.target.value)} className="w-44" />}</Field>
        <Field label="Filled to" error={valid ? undefined : 'Pick a “to” day on or after the “from” day'}>
          {(c) => <Input {...c} type="date" value={to} onChange={(e) => setTo(e.target.value)} className="w-44" />}
        </Field>
      </div>
      {report.isPending ? (
        <Spinner label="Loading the trace report" />
      ) : report.isError ? (
        <Alert tone="error">{problemMessage(report.error)}</Alert>
      ) : report.data.batches.length === 0 ? (
        <p className="text-ink-muted">No keg was filled in this range.</p>
      ) : (
        report.data.batches.map((t) => (
          <section key={t.batch.id} className="flex flex-col gap-2 rounded-lg border border-line bg-surface p-4" aria-label={t.batch.name}>
            <h2 className="text-lg">
              <Link to={`${paths.batches}/${t.batch.id}`}>{t.batch.name}</Link>
              <span className="ml-2 text-sm font-normal text-ink-muted">
                {[t.batch.style, t.batch.ownerName].filter(Boolean).join(' · ')} · {pluralize(t.totals.kegs, 'keg')}
              </span>
            </h2>
            <TraceFacts trace={t} />
            <TraceTable trace={t} />
          </section>
        ))
      )}
      <p className="text-xs text-ink-muted">
        Allergens are the batch’s own notes and what its finings add (gelatin and isinglass are animal-derived, so not vegan; silica finings are vegan). What a
        label or a recall must say: local food rules govern.
      </p>
    </div>
  );
};

export default TraceReportRoute;
