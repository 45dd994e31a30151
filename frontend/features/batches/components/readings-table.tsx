import { createColumnHelper } from '@tanstack/react-table';
import { z } from 'zod';
import { useMemo, useState } from 'react';
import { gravityUnitLabels, readingSortFields, type BatchDetail, type ReadingDto } from '../../../../shared/schemas/batches.ts';
import { applyListPatch, defineListQuery, figureMeta, ListTable, pagingQuerySchema, type ListPatch } from '@/components/list-kit';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/dialog';
import { useDeleteReading, useReadings, type ReadingsQuery } from '@/features/batches/api/readings';
import { formatSg } from '@/features/batches/components/gravity-format';
import { useUnits } from '@/hooks/use-units';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

const column = createColumnHelper<ReadingDto>();
const readingsText = (batch: BatchDetail) => ({ caption: `Readings of ${batch.name}`, empty: 'No readings yet.', noun: 'readings' });
/** The readings sit on the batch's page, so their paging and sort stay with the table (newest first, 25 a page). */
const readingsQuery = defineListQuery(
  pagingQuerySchema(25).extend({ sort: z.enum(readingSortFields).default('takenAt'), order: z.enum(['asc', 'desc']).default('desc') }),
);

/** The batch's readings, paged and sorted on the server (a digital hydrometer logs thousands). */
export const ReadingsTable = ({ batch }: { batch: BatchDetail }) => {
  const units = useUnits();
  const [query, setQueryState] = useState<ReadingsQuery>(readingsQuery.defaults);
  const setQuery = (patch: ListPatch<ReadingsQuery>) => setQueryState((current) => applyListPatch(readingsQuery, current, patch));
  const readings = useReadings(batch.id, query);
  const remove = useDeleteReading(batch.id);
  const [deleting, setDeleting] = useState<ReadingDto | null>(null);
  const columns = useMemo(
    () => [
      column.accessor('takenAt', { header: 'Taken', cell: ({ getValue }) => <span className="whitespace-nowrap">{formatDateTime(getValue())}</span> }),
      column.accessor('gravitySg', {
        header: 'Gravity (SG)',
        cell: ({ row }) => (
          <span className="tabular-nums font-medium">
            {formatSg(row.original.gravitySg, 4)}
            {row.original.corrected ? (
              <span
                className="ml-1.5 text-xs font-normal text-ink-muted"
                title={row.original.rawSg !== null ? `Before correction ${formatSg(row.original.rawSg, 4)}` : undefined}
              >
                corrected
              </span>
            ) : null}
          </span>
        ),
        meta: figureMeta,
      }),
      column.display({
        id: 'entered',
        header: 'As entered',
        cell: ({ row }) => (
          <span className="whitespace-nowrap tabular-nums text-ink-muted">
            {row.original.enteredUnit === 'sg'
              ? formatSg(row.original.enteredValue, Math.max(3, (String(row.original.enteredValue).split('.')[1] ?? '').length))
              : row.original.enteredValue}{' '}
            {gravityUnitLabels[row.original.enteredUnit]}
            {row.original.method ? (
              <span className="ml-1.5 text-xs" data-testid="reading-method">
                {row.original.method === 'wort' ? 'wort' : 'alcohol-corrected'}
              </span>
            ) : null}
          </span>
        ),
      }),
      column.accessor('temperatureC', {
        header: 'Temp.',
        cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums">{units.temperature(getValue())}</span>,
        meta: figureMeta,
      }),
      column.accessor('source', {
        header: 'Source',
        enableSorting: false,
        cell: ({ getValue }) => <Badge tone={getValue() === 'import' ? 'neutral' : 'muted'}>{getValue() === 'import' ? 'Imported' : 'By hand'}</Badge>,
      }),
      column.accessor('createdByName', {
        header: 'By',
        enableSorting: false,
        cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue() ?? '—'}</span>,
      }),
      column.accessor('note', {
        header: 'Note',
        enableSorting: false,
        cell: ({ getValue }) => <span className="text-ink-muted">{getValue()}</span>,
        meta: { className: 'min-w-32' },
      }),
      ...(batch.can.deleteReading
        ? [
            column.display({
              id: 'actions',
              header: () => <span className="sr-only">Actions</span>,
              cell: ({ row }) => (
                <Button
                  variant="ghost"
                  size="sm"
                  onClick={() => setDeleting(row.original)}
                  aria-label={`Delete the reading of ${formatDateTime(row.original.takenAt)}`}
                >
                  Delete
                </Button>
              ),
              meta: { className: 'text-right w-px' },
            }),
          ]
        : []),
    ],
    [units, batch.can.deleteReading],
  );
  return (
    <div className="flex flex-col gap-3">
      <ListTable list={readings} query={query} onQueryChange={setQuery} columns={columns} sortFields={readingSortFields} {...readingsText(batch)} />
      <ConfirmDialog
        open={deleting !== null}
        title="Delete this reading?"
        confirmLabel="Delete it"
        pending={remove.isPending}
        error={remove.isError ? problemMessage(remove.error) : null}
        onClose={() => {
          remove.reset();
          setDeleting(null);
        }}
        onConfirm={() => deleting && remove.mutate(deleting.id, { onSuccess: () => setDeleting(null) })}
      >
        {deleting
          ? `${formatSg(deleting.gravitySg, 4)} SG taken ${formatDateTime(deleting.takenAt)}. The batch’s figures are worked out again without it.`
          : null}
      </ConfirmDialog>
    </div>
  );
};
