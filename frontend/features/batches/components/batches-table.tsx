import { createColumnHelper } from '@tanstack/react-table';
import { useEffect, useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import {
  batchSortFields,
  batchStatusLabels,
  batchStatuses,
  type BatchListItem,
  type BatchListQuery,
  type BatchSortField,
} from '../../../../shared/schemas/batches.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { Button } from '@/components/ui/button';
import { DataTable, DataTablePagination } from '@/components/ui/data-table';
import { useServerTable } from '@/components/ui/use-server-table';
import { Checkbox, Input, Select } from '@/components/ui/input';
import { paths } from '@/config/paths';
import { BatchStatusBadge } from '@/features/batches/components/batch-status-badge';
import { formatSg } from '@/features/batches/components/gravity-format';
import type { BatchListQueryPatch } from '@/features/batches/hooks/use-batches-search-params';
import { useUnits } from '@/hooks/use-units';
import { formatDate, formatDateTime } from '@/utils/format';

const column = createColumnHelper<BatchListItem>();
const isSortField = (id: string): id is BatchSortField => (batchSortFields as readonly string[]).includes(id);
const labelClass = 'flex flex-col gap-1 text-xs font-medium text-ink-muted';

export interface BatchesToolbarProps {
  query: BatchListQuery;
  onQueryChange: (patch: BatchListQueryPatch, options?: { replace?: boolean }) => void;
  /** Whoever sees every member's batches may narrow the list to their own. */
  showMine: boolean;
}

export const BatchesToolbar = ({ query, onQueryChange, showMine }: BatchesToolbarProps) => {
  const [text, setText] = useState(query.q ?? '');
  useEffect(() => setText(query.q ?? ''), [query.q]);
  useEffect(() => {
    const value = text.trim();
    if (value === (query.q ?? '')) return;
    const timer = setTimeout(() => onQueryChange({ q: value || undefined }, { replace: true }), 300);
    return () => clearTimeout(timer);
  }, [text, query.q, onQueryChange]);
  return (
    <div className="flex flex-wrap items-end gap-3">
      <form
        role="search"
        className="contents"
        onSubmit={(event) => {
          event.preventDefault();
          onQueryChange({ q: text.trim() || undefined });
        }}
      >
        <label className={labelClass}>
          Search
          <Input type="search" value={text} onChange={(e) => setText(e.target.value)} placeholder="Name, style or member" className="w-64" />
        </label>
      </form>
      <label className={labelClass}>
        Status
        <Select
          value={query.status ?? ''}
          onChange={(e) => onQueryChange({ status: (e.target.value || undefined) as BatchListQuery['status'] })}
          className="w-44"
        >
          <option value="">Any status</option>
          {batchStatuses.map((s) => (
            <option key={s} value={s}>
              {batchStatusLabels[s]}
            </option>
          ))}
        </Select>
      </label>
      {showMine ? <Checkbox label="Only mine" checked={Boolean(query.mine)} onChange={(e) => onQueryChange({ mine: e.target.checked || undefined })} /> : null}
      {query.q || query.status || query.mine ? (
        <Button variant="ghost" size="sm" onClick={() => onQueryChange({ q: undefined, status: undefined, mine: undefined })}>
          Clear filters
        </Button>
      ) : null}
    </div>
  );
};

export interface BatchesTableProps {
  query: BatchListQuery;
  data: Page<BatchListItem> | undefined;
  isLoading: boolean;
  /** The last load failed: the table shows it with Retry instead of its empty text. */
  error?: unknown;
  onRetry?: () => void;
  isFetching: boolean;
  isPlaceholderData: boolean;
  showOwner: boolean;
  onQueryChange: (patch: BatchListQueryPatch) => void;
}

/** Batches, sorted, filtered and paged on the server. */
export const BatchesTable = ({ query, data, isLoading, error, onRetry, isFetching, isPlaceholderData, showOwner, onQueryChange }: BatchesTableProps) => {
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
      ...(showOwner
        ? [column.accessor('ownerName', { id: 'owner', header: 'Member', cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span> })]
        : []),
      column.accessor('status', { header: 'Status', cell: ({ getValue }) => <BatchStatusBadge status={getValue()} /> }),
      column.accessor('volumeLiters', {
        header: 'Volume',
        cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums">{units.volume(getValue())}</span>,
        meta: { className: 'text-right' },
      }),
      column.accessor('og', {
        header: 'OG',
        enableSorting: false,
        cell: ({ getValue }) => <span className="tabular-nums">{formatSg(getValue())}</span>,
        meta: { className: 'text-right' },
      }),
      column.accessor('currentGravity', {
        header: 'Now',
        enableSorting: false,
        cell: ({ getValue }) => <span className="tabular-nums">{formatSg(getValue())}</span>,
        meta: { className: 'text-right' },
      }),
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
      column.accessor('createdAt', {
        header: 'Created',
        sortDescFirst: true,
        cell: ({ getValue }) => <span className="whitespace-nowrap">{formatDate(getValue())}</span>,
      }),
    ],
    [showOwner, units],
  );
  const table = useServerTable({ data, columns, query, onQueryChange, isSortField, getRowId: (b) => b.id });
  return (
    <div className="flex flex-col gap-3">
      <DataTable
        table={table}
        caption="Batches"
        isLoading={isLoading}
        error={error}
        onRetry={onRetry}
        isFetching={isFetching}
        empty={query.q || query.status ? 'No batch matches these filters.' : 'No batches yet.'}
      />
      <DataTablePagination
        failed={Boolean(error)}
        page={query.page}
        pageSize={query.pageSize}
        total={data?.total ?? 0}
        isPlaceholder={isPlaceholderData}
        onPageChange={(page) => onQueryChange({ page })}
        onPageSizeChange={(pageSize) => onQueryChange({ pageSize })}
        noun="batches"
      />
    </div>
  );
};
