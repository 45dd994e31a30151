import { abvMethod } from '../../../../shared/brewing/index.ts';
import type { BatchDetail } from '../../../../shared/schemas/batches.ts';
import { formatPercent, formatPlato, formatSg } from '@/features/batches/components/gravity-format';
import { formatDate, formatDateTime } from '@/utils/format';

const Figure = ({ label, value, sub, testId }: { label: string; value: string; sub?: string | undefined; testId?: string }) => (
  <div className="flex min-w-32 flex-col rounded-md border border-line bg-surface px-3 py-2" data-testid={testId}>
    <dt className="text-xs font-semibold tracking-wide text-ink-muted uppercase">{label}</dt>
    <dd className="text-xl font-semibold tabular-nums text-ink">{value}</dd>
    {sub ? <dd className="text-xs text-ink-muted">{sub}</dd> : null}
  </div>
);

/** OG, current gravity, FG, ABV and attenuations, as computed on the server from the readings. */
export const BatchFigures = ({ batch }: { batch: BatchDetail }) => {
  const soFar = batch.figuresFrom === 'current' ? ' so far' : '';
  return (
    <dl className="flex flex-wrap gap-3">
      <Figure
        label="OG"
        value={formatSg(batch.og)}
        sub={batch.og !== null ? formatPlato(batch.og) : batch.targetOg ? `target ${formatSg(batch.targetOg)}` : undefined}
        testId="figure-og"
      />
      <Figure label="Now" value={formatSg(batch.currentGravity)} sub={batch.lastReadingAt ? formatDateTime(batch.lastReadingAt) : undefined} />
      <Figure
        label="FG"
        value={formatSg(batch.fg)}
        sub={batch.fg !== null ? formatPlato(batch.fg) : batch.targetFg ? `target ${formatSg(batch.targetFg)}` : 'when stable'}
        testId="figure-fg"
      />
      <Figure label={`ABV${soFar}`} value={formatPercent(batch.abv, 2)} sub={`${abvMethod.name} (${abvMethod.id}), by volume`} testId="figure-abv" />
      <Figure label={`Apparent att.${soFar}`} value={formatPercent(batch.apparentAttenuation)} />
      <Figure label={`Real att.${soFar}`} value={formatPercent(batch.realAttenuation)} />
    </dl>
  );
};

/** Is the gravity stable (ready to transfer), still falling (with the forecast), or stuck above its target? */
export const StableSignal = ({ batch }: { batch: BatchDetail }) => {
  const { stable, forecast } = batch;
  const rule = `the same gravity within ±${stable.toleranceSg.toFixed(3)} over ${stable.spanDays} day${stable.spanDays === 1 ? '' : 's'}`;
  const stuck = stable.stable && batch.targetFg !== null && batch.currentGravity !== null && batch.currentGravity > batch.targetFg + 0.004;
  if (batch.readingsCount < 2) {
    return <p className="text-sm text-ink-muted">The stable-gravity signal needs at least two readings ({rule}).</p>;
  }
  if (stuck) {
    return (
      <div role="status" data-testid="stable-signal" className="rounded-md border border-due/40 bg-due-soft px-3 py-2 text-sm text-due-strong">
        <p className="font-semibold">
          Stable at {formatSg(batch.currentGravity)}, well above the {formatSg(batch.targetFg)} target: fermentation may be stuck.
        </p>
        <p>Check the temperature, rouse the yeast or ask the brewer on duty before transferring.</p>
      </div>
    );
  }
  if (stable.stable) {
    return (
      <div role="status" data-testid="stable-signal" className="rounded-md border border-hop/40 bg-hop-soft px-3 py-2 text-sm text-hop-strong">
        <p className="font-semibold">
          Stable since {formatDateTime(stable.since)}: {rule}.
        </p>
        <p>Final gravity {formatSg(batch.currentGravity)}. Ready to transfer when you are.</p>
      </div>
    );
  }
  return (
    <div role="status" data-testid="stable-signal" className="rounded-md border border-line-strong bg-surface px-3 py-2 text-sm">
      <p className="font-semibold">Not stable yet ({rule}).</p>
      {forecast ? (
        <p className="text-ink-muted">
          Forecast: about {formatSg(forecast.predictedFg)} around {formatDate(forecast.readyAt)}
          {batch.targetFg !== null
            ? forecast.targetReachedAt
              ? `; the ${formatSg(batch.targetFg)} target around ${formatDate(forecast.targetReachedAt)}`
              : forecast.predictedFg > batch.targetFg + 0.001
                ? `; it is not heading for the ${formatSg(batch.targetFg)} target`
                : `; the ${formatSg(batch.targetFg)} target is about reached`
            : ''}
          .{' '}
          {forecast.model === 'linear-trend'
            ? `The readings still fall on a straight line, so their trend is extended to ${batch.targetFg !== null ? 'the target' : 'a typical 75 % apparent attenuation'}.`
            : 'Fitted to the readings as an exponential decay toward a final gravity.'}
        </p>
      ) : (
        <p className="text-ink-muted">No forecast yet: it needs three readings on a falling curve.</p>
      )}
    </div>
  );
};
