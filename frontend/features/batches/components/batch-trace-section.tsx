import type { BatchDetail } from '../../../../shared/schemas/batches.ts';
import { Alert } from '@/components/ui/alert';
import { buttonClasses } from '@/components/ui/button';
import { Spinner } from '@/components/ui/spinner';
import { batchTraceHref, useBatchTrace } from '@/features/batches/api/get-trace';
import { TraceFacts, TraceTable } from '@/features/batches/components/trace-view';
import { problemMessage } from '@/lib/api-client';
import { pluralize } from '@/utils/format';

/** The batch page's trace: what the beer carries, every keg it went into, where each is now, who has it and which tap. */
export const BatchTraceSection = ({ batch }: { batch: BatchDetail }) => {
  const trace = useBatchTrace(batch.id);
  return (
    <section className="flex flex-col gap-3" aria-labelledby="trace-title">
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="trace-title" className="text-lg">
          Where it went
        </h2>
        {trace.data?.fills.length ? (
          <div className="flex gap-2">
            <a className={buttonClasses('secondary')} href={batchTraceHref(batch.id, 'csv')} download>
              Trace CSV
            </a>
            <a className={buttonClasses('secondary')} href={batchTraceHref(batch.id, 'pdf')} target="_blank" rel="noreferrer">
              Trace PDF
            </a>
          </div>
        ) : null}
      </header>
      {trace.isPending ? (
        <Spinner label="Loading the trace" />
      ) : trace.isError ? (
        <Alert tone="error">{problemMessage(trace.error)}</Alert>
      ) : (
        <>
          <TraceFacts trace={trace.data} />
          {trace.data.fills.length ? (
            <p className="text-sm text-ink-muted">
              {pluralize(trace.data.totals.kegs, 'keg')}; {trace.data.totals.holding} still holding it ({trace.data.totals.withMembers} with members,{' '}
              {trace.data.totals.onTaps} on taps).
            </p>
          ) : null}
          <TraceTable trace={trace.data} />
        </>
      )}
    </section>
  );
};
