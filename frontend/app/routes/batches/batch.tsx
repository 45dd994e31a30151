import { useState } from 'react';
import { useLocation, useParams } from 'react-router-dom';
import { batchStatusLabels, nextBatchStatuses, type BatchStatus } from '../../../../shared/schemas/batches.ts';
import { PageHeader, QueryFallback } from '@/components/layouts/page-header';
import { Alert } from '@/components/ui/alert';
import { Button, ButtonLink } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { parentPages, paths } from '@/config/paths';
import { useBatch } from '@/features/batches/api/get-batch';
import { useUpdateBatch } from '@/features/batches/api/save-batch';
import { BatchFigures, StableSignal } from '@/features/batches/components/batch-figures';
import { BatchFormDialog } from '@/features/batches/components/batch-form-dialog';
import { BatchStatusBadge } from '@/features/batches/components/batch-status-badge';
import { GravityChart } from '@/features/batches/components/gravity-chart';
import { ReadingFormDialog } from '@/features/batches/components/reading-form-dialog';
import { ReadingsTable } from '@/features/batches/components/readings-table';
import { BatchTraceSection } from '@/features/batches/components/batch-trace-section';
import { cellarPaths } from '@/config/cellar-paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { fromDisplay, toDisplay } from '@/lib/units';
import { formatCount, formatDate, formatDateTime } from '@/utils/format';

const actionLabels: Partial<Record<BatchStatus, string>> = {
  fermenting: 'Mark fermenting',
  conditioning: 'Mark conditioning',
  packaged: 'Mark packaged…',
  discarded: 'Discard…',
};

/** One batch: its figures, the stable-gravity signal and forecast, the gravity chart and the readings. */
const BatchRoute = () => {
  const { batchId = '' } = useParams();
  const detail = useBatch(batchId);
  const units = useUnits();
  const update = useUpdateBatch(batchId);
  const ability = useAppAbility();
  const [adding, setAdding] = useState(false);
  const [editing, setEditing] = useState(false);
  const [closing, setClosing] = useState<'packaged' | 'discarded' | null>(null);
  const [packaged, setPackaged] = useState('');
  const location = useLocation();
  const imported = (location.state as { imported?: number; skipped?: number } | null) ?? null;
  useDocumentTitle(detail.data ? `${detail.data.name} · Batches` : 'Batches');

  if (detail.isPending || detail.isError) return <QueryFallback query={detail} what="batch" />;
  const batch = detail.data;
  const next = batch.can.update ? nextBatchStatuses[batch.status] : [];

  const changeStatus = (status: BatchStatus) => {
    if (status === 'packaged' || status === 'discarded') {
      setPackaged(String(Math.round(toDisplay.volume(batch.volumeLiters, units.units) * 10) / 10));
      setClosing(status);
      return;
    }
    update.mutate({ status });
  };

  return (
    <div className="flex flex-col gap-5">
      <PageHeader
        parent={parentPages.batches}
        title={batch.name}
        badge={<BatchStatusBadge status={batch.status} />}
        intro={
          <>
            {[batch.style, units.volume(batch.volumeLiters), batch.ownerName].filter(Boolean).join(' · ')}
            {batch.bookings.length
              ? ` · in ${batch.bookings.map((b) => `${b.equipmentCode} (${formatDate(b.startsAt)} – ${formatDate(b.endsAt)})`).join(', ')}`
              : ''}
          </>
        }
        actions={
          <div className="flex flex-wrap gap-2">
            {(batch.status === 'fermenting' || batch.status === 'conditioning') && ability.can('create', 'Transfer') ? (
              <ButtonLink to={cellarPaths.newTransfer({ batchId: batch.id })}>Transfer to kegs</ButtonLink>
            ) : null}
            {batch.can.addReading ? <Button onClick={() => setAdding(true)}>Add a reading</Button> : null}
            {batch.can.importReadings ? (
              <ButtonLink to={`${paths.batches}/${batch.id}/import`} variant="secondary">
                Import readings
              </ButtonLink>
            ) : null}
            {batch.can.update ? (
              <Button variant="secondary" onClick={() => setEditing(true)}>
                Edit
              </Button>
            ) : null}
            {next.map((s) => (
              <Button key={s} variant="ghost" onClick={() => changeStatus(s)} pending={update.isPending && update.variables?.status === s}>
                {actionLabels[s] ?? batchStatusLabels[s]}
              </Button>
            ))}
          </div>
        }
      >
        {batch.packagedAt ? (
          <p className="text-sm text-ink-muted">
            Packaged {formatDateTime(batch.packagedAt)}
            {batch.packagedLiters !== null ? `: ${units.volume(batch.packagedLiters)}` : ''}
          </p>
        ) : null}
      </PageHeader>
      {update.isError && !closing ? <Alert tone="error">{problemMessage(update.error)}</Alert> : null}
      {typeof imported?.imported === 'number' ? (
        <Alert tone="success">
          Imported {formatCount(imported.imported)} reading{imported.imported === 1 ? '' : 's'}
          {imported.skipped ? `; ${formatCount(imported.skipped)} row${imported.skipped === 1 ? '' : 's'} skipped` : ''}.
        </Alert>
      ) : null}

      <BatchFigures batch={batch} />
      <StableSignal batch={batch} />

      <section className="flex flex-col gap-2">
        <h2 className="text-lg">Gravity</h2>
        <GravityChart batch={batch} />
      </section>

      <section className="flex flex-col gap-2">
        <h2 className="text-lg">Readings</h2>
        <ReadingsTable batch={batch} />
      </section>

      <BatchTraceSection batch={batch} />

      {batch.notes ? (
        <section className="flex flex-col gap-1">
          <h2 className="text-lg">Notes</h2>
          <p className="whitespace-pre-wrap text-sm">{batch.notes}</p>
        </section>
      ) : null}

      <p className="text-xs text-ink-muted">
        ABV and attenuation follow the ASBC/Balling relations from the readings. Alcohol figures for labels and tax: local rules govern, and licensed practice
        decides what you declare.
      </p>

      <ReadingFormDialog open={adding} onClose={() => setAdding(false)} batch={batch} />
      <BatchFormDialog open={editing} onClose={() => setEditing(false)} batch={batch} onSaved={() => setEditing(false)} />
      <Dialog
        open={closing !== null}
        onClose={() => setClosing(null)}
        busy={update.isPending}
        title={closing === 'packaged' ? 'Mark the batch packaged' : `Discard ${batch.name}?`}
        description={
          closing === 'packaged'
            ? 'The packaged volume goes into the production records.'
            : 'A discarded batch takes no more readings, and what is left of it counts as dumped in the production records. This cannot be undone.'
        }
      >
        <form
          className="flex flex-col gap-4"
          onSubmit={(e) => {
            e.preventDefault();
            if (closing === 'packaged') {
              const v = Number(packaged.replace(',', '.'));
              update.mutate(
                { status: 'packaged', packagedLiters: Math.round(fromDisplay.volume(v, units.units) * 100) / 100 },
                { onSuccess: () => setClosing(null) },
              );
            } else update.mutate({ status: 'discarded' }, { onSuccess: () => setClosing(null) });
          }}
        >
          {closing === 'packaged' ? (
            <Field label={`Volume packaged (${units.labels.volume})`}>
              {(c) => <Input {...c} inputMode="decimal" value={packaged} onChange={(e) => setPackaged(e.target.value)} autoFocus />}
            </Field>
          ) : null}
          {update.isError ? <Alert tone="error">{problemMessage(update.error)}</Alert> : null}
          <DialogActions>
            <Button variant="secondary" onClick={() => setClosing(null)} disabled={update.isPending}>
              Cancel
            </Button>
            <Button type="submit" pending={update.isPending}>
              {closing === 'packaged' ? 'Mark packaged' : 'Discard it'}
            </Button>
          </DialogActions>
        </form>
      </Dialog>
    </div>
  );
};

export default BatchRoute;
