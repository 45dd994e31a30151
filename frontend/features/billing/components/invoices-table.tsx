import { createColumnHelper } from '@tanstack/react-table';
import { useEffect, useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { periodLabel } from '../../../../shared/billing/dates.ts';
import { invoiceSortFields, invoiceStatuses, invoiceStatusLabels, type InvoiceListQuery, type InvoiceSummary } from '../../../../shared/schemas/billing.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { Button } from '@/components/ui/button';
import { DataTable, DataTablePagination } from '@/components/ui/data-table';
import { useServerTable } from '@/components/ui/use-server-table';
import { Input, Select } from '@/components/ui/input';
import { invoiceHref } from '@/config/paths';
import { useBillableMembers } from '@/features/billing/api/manual-charges';
import { InvoiceStatusBadge } from '@/features/billing/components/invoice-status-badge';
import { Money } from '@/features/billing/components/money';
import type { InvoiceListQueryPatch } from '@/features/billing/hooks/use-invoices-search-params';
import { formatDate } from '@/utils/format';

type SortField = (typeof invoiceSortFields)[number];
const isSortField = (id: string): id is SortField => (invoiceSortFields as readonly string[]).includes(id);
const column = createColumnHelper<InvoiceSummary>();

export interface InvoicesTableProps {
  query: InvoiceListQuery;
  data: Page<InvoiceSummary> | undefined;
  isLoading: boolean;
  /** The last load failed: the table shows it with Retry instead of its empty text. */
  error?: unknown;
  onRetry?: () => void;
  isFetching: boolean;
  isPlaceholderData: boolean;
  hasFilters: boolean;
  onQueryChange: (patch: InvoiceListQueryPatch, options?: { replace?: boolean }) => void;
  /** Where a row's number links to. */
  hrefFor?: (invoice: InvoiceSummary) => string;
  /** The member's own view: no member column or member filter. */
  own?: boolean;
}

const MemberFilter = ({ value, onChange }: { value: string | undefined; onChange: (memberId: string | undefined) => void }) => {
  const members = useBillableMembers();
  return (
    <label className="flex flex-col gap-1 text-sm font-medium">
      Member
      <Select value={value ?? ''} onChange={(e) => onChange(e.target.value || undefined)} className="w-56">
        <option value="">Everyone</option>
        {(members.data ?? []).map((m) => (
          <option key={m.id} value={m.id}>
            {m.name}
          </option>
        ))}
      </Select>
    </label>
  );
};

export const InvoicesToolbar = ({
  query,
  onQueryChange,
  hasFilters,
  own = false,
}: Pick<InvoicesTableProps, 'query' | 'onQueryChange' | 'hasFilters' | 'own'>) => {
  const [text, setText] = useState(query.q ?? '');
  useEffect(() => setText(query.q ?? ''), [query.q]);
  useEffect(() => {
    if ((query.q ?? '') === text.trim()) return;
    const t = setTimeout(() => onQueryChange({ q: text.trim() || undefined }, { replace: true }), 300);
    return () => clearTimeout(t);
  }, [text, query.q, onQueryChange]);
  return (
    <div role="search" aria-label="Filter invoices" className="flex flex-wrap items-end gap-3">
      {!own ? (
        <label className="flex min-w-52 flex-1 flex-col gap-1 text-sm font-medium">
          Search
          <Input type="search" value={text} placeholder="Number, member or e-mail" onChange={(e) => setText(e.target.value)} />
        </label>
      ) : null}
      <label className="flex flex-col gap-1 text-sm font-medium">
        Period
        <Input type="month" value={query.period ?? ''} onChange={(e) => onQueryChange({ period: e.target.value || undefined })} className="w-44" />
      </label>
      <label className="flex flex-col gap-1 text-sm font-medium">
        Status
        <Select
          value={query.status ?? ''}
          onChange={(e) => onQueryChange({ status: (e.target.value || undefined) as InvoiceListQuery['status'] })}
          className="w-36"
        >
          <option value="">Any</option>
          {invoiceStatuses.map((s) => (
            <option key={s} value={s}>
              {invoiceStatusLabels[s]}
            </option>
          ))}
        </Select>
      </label>
      {!own ? <MemberFilter value={query.memberId} onChange={(memberId) => onQueryChange({ memberId })} /> : null}
      <label className="flex min-h-11 items-center gap-2 text-sm md:min-h-9">
        <input
          type="checkbox"
          className="size-4 accent-copper"
          checked={query.unpaid === true}
          onChange={(e) => onQueryChange({ unpaid: e.target.checked || undefined })}
        />
        Only unpaid
      </label>
      {hasFilters ? (
        <Button variant="ghost" onClick={() => onQueryChange({ q: undefined, period: undefined, status: undefined, memberId: undefined, unpaid: undefined })}>
          Clear filters
        </Button>
      ) : null}
    </div>
  );
};

export const InvoicesTable = ({
  query,
  data,
  isLoading,
  error,
  onRetry,
  isFetching,
  isPlaceholderData,
  hasFilters,
  onQueryChange,
  hrefFor,
  own = false,
}: InvoicesTableProps) => {
  const columns = useMemo(
    () => [
      column.accessor('number', {
        header: 'Number',
        cell: ({ row }) => (
          <Link to={hrefFor ? hrefFor(row.original) : invoiceHref(row.original.id)} className="font-medium whitespace-nowrap tabular-nums">
            {row.original.number ?? 'Draft'}
          </Link>
        ),
      }),
      ...(own
        ? []
        : [
            column.accessor('memberName', {
              id: 'member',
              header: 'Member',
              cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
              meta: { className: 'min-w-40' },
            }),
          ]),
      column.accessor('period', { header: 'Period', cell: ({ getValue }) => <span className="whitespace-nowrap">{periodLabel(getValue())}</span> }),
      column.accessor('issuedOn', {
        header: 'Invoice date',
        sortDescFirst: true,
        cell: ({ getValue }) => <span className="whitespace-nowrap">{formatDate(getValue())}</span>,
      }),
      column.accessor('dueOn', {
        header: 'Due',
        sortDescFirst: true,
        cell: ({ getValue }) => <span className="whitespace-nowrap">{formatDate(getValue())}</span>,
      }),
      column.accessor('status', {
        header: 'Status',
        cell: ({ row }) => <InvoiceStatusBadge status={row.original.status} overdue={row.original.overdue} partPaid={row.original.paidCents > 0} />,
      }),
      column.accessor('totalCents', {
        id: 'total',
        header: 'Total',
        sortDescFirst: true,
        cell: ({ row }) => <Money cents={row.original.totalCents} currency={row.original.currency} />,
        meta: { className: 'text-right' },
      }),
      column.accessor('amountDueCents', {
        id: 'amountDue',
        header: 'To pay',
        sortDescFirst: true,
        cell: ({ row }) =>
          row.original.status === 'issued' ? (
            <Money cents={row.original.amountDueCents} currency={row.original.currency} className="font-medium" />
          ) : (
            <span className="text-ink-muted">—</span>
          ),
        meta: { className: 'text-right' },
      }),
    ],
    [hrefFor, own],
  );

  const table = useServerTable({ data, columns, query, onQueryChange, isSortField, getRowId: (r) => r.id });

  return (
    <div className="flex flex-col gap-3">
      <DataTable
        table={table}
        caption="Invoices"
        isLoading={isLoading}
        error={error}
        onRetry={onRetry}
        isFetching={isFetching}
        rowClassName={(row) => (row.original.status === 'void' ? 'text-ink-muted' : undefined)}
        empty={hasFilters ? 'No invoice matches these filters.' : 'No invoices yet.'}
      />
      <DataTablePagination
        failed={Boolean(error)}
        page={query.page}
        pageSize={query.pageSize}
        total={data?.total ?? 0}
        isPlaceholder={isPlaceholderData}
        onPageChange={(page) => onQueryChange({ page })}
        onPageSizeChange={(pageSize) => onQueryChange({ pageSize })}
        noun={['invoice', 'invoices']}
      />
    </div>
  );
};
