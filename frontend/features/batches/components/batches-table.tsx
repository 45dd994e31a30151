import { createColumnHelper } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { batchSortFields, batchStatusLabels, batchStatuses, type BatchListItem, type BatchListQuery } from '../../../../shared/schemas/batches.ts';
import { dateCell, figureMeta, ListSearch, QueryFilter, ListTable, nowrapCell, type ListProps } from '@/components/list-kit';
import { Button } from '@/components/ui/button';
import { Checkbox } from '@/components/ui/input';
import { paths } from '@/config/paths';
import { BatchStatusBadge } from '@/features/batches/components/batch-status-badge';
import { formatSg } from '@/features/batches/components/gravity-format';
import { useUnits } from '@/hooks/use-units';
import { formatDateTime } from '@/utils/format';

const column = createColumnHelper<BatchListItem>();
const sgCell = ({ getValue }: { getValue: () => number | null }) => <span className="tabular-nums">{formatSg(getValue())}</span>;

export interface BatchesToolbarProps extends Pick<ListProps<BatchListItem, BatchListQuery>, 'query' | 'onQueryChange'> {
  hasFilters: boolean;
  onClearFilters: () => void;
  /** Whoever sees every member's batches may narrow the list to their own. */
  showMine: boolean;
}

export const BatchesToolbar = ({ query, onQueryChange, showMine, hasFilters, onClearFilters }: BatchesToolbarProps) => (
  <div className="flex flex-wrap items-end gap-3">
    <form role="search" className="contents" onSubmit={(event) => event.preventDefault()}>
      <ListSearch label="Search" muted query={query} onQueryChange={onQueryChange} placeholder="Name, style or member" className="w-64" />
    </form>
    <QueryFilter
      name="status"
      label="Status"
      muted
      {...{ query, onQueryChange }}
      options={batchStatuses}
      labels={batchStatusLabels}
      anyLabel="Any status"
      selectClassName="w-44"
    />
    {showMine ? <Checkbox label="Only mine" checked={Boolean(query.mine)} onChange={(e) => onQueryChange({ mine: e.target.checked || undefined })} /> : null}
    {hasFilters ? (
      <Button variant="ghost" size="sm" onClick={onClearFilters}>
        Clear filters
      </Button>
    ) : null}
  </div>
);

export interface BatchesTableProps extends ListProps<BatchListItem, BatchListQuery> {
  showOwner: boolean;
}

/** Batches, sorted, filtered and paged on the server. */
export const BatchesTable = ({ query, list, showOwner, onQueryChange }: BatchesTableProps) => {
  const units = useUnits();
  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Batch',
        cell: ({ row }) => (
          <Link to={`${paths.batches}/${row.original.id}`} className="font-medium">
            {row.original.name}
          </Link>
        ),
        meta: { className: 'min-w-44' },
      }),
      column.accessor('style', { header: 'Style', cell: ({ getValue }) => getValue() || <span className="text-ink-faint">—</span> }),
      ...(showOwner ? [column.accessor('ownerName', { id: 'owner', header: 'Member', cell: nowrapCell })] : []),
      column.accessor('status', { header: 'Status', cell: ({ getValue }) => <BatchStatusBadge status={getValue()} /> }),
      column.accessor('volumeLiters', {
        header: 'Volume',
        cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums">{units.volume(getValue())}</span>,
        meta: figureMeta,
      }),
      column.accessor('og', { header: 'OG', enableSorting: false, cell: sgCell, meta: figureMeta }),
      column.accessor('currentGravity', { header: 'Now', enableSorting: false, cell: sgCell, meta: figureMeta }),
      column.accessor('lastReadingAt', {
        header: 'Last reading',
        sortDescFirst: true,
        cell: ({ getValue, row }) =>
          getValue() ? (
            <span className="whitespace-nowrap">
              {formatDateTime(getValue())} <span className="text-ink-muted">({row.original.readingsCount})</span>
            </span>
          ) : (
            <span className="text-ink-muted">No readings</span>
          ),
      }),
      column.accessor('createdAt', { header: 'Created', sortDescFirst: true, cell: dateCell }),
    ],
    [showOwner, units],
  );
  const empty = query.q || query.status ? 'No batch matches these filters.' : 'No batches yet.';
  return <ListTable {...{ query, list, onQueryChange, columns }} sortFields={batchSortFields} caption="Batches" empty={empty} noun="batches" />;
};
