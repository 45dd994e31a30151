import { createColumnHelper, type Row } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { periodLabel } from '../../../../shared/billing/dates.ts';
import { invoiceSortFields, invoiceStatuses, invoiceStatusLabels, type InvoiceListQuery, type InvoiceSummary } from '../../../../shared/schemas/billing.ts';
import { Dash, dateCell, figureMeta, FilterField, ListSearch, QueryFilter, ListTable, nowrapCell, type ListProps } from '@/components/list-kit';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import { invoiceHref } from '@/config/paths';
import { useBillableMembers } from '@/features/billing/api/manual-charges';
import { InvoiceStatusBadge } from '@/features/billing/components/invoice-status-badge';
import { Money } from '@/features/billing/components/money';

const column = createColumnHelper<InvoiceSummary>();
const invoiceNoun = ['invoice', 'invoices'] as const;
const voidRow = (row: Row<InvoiceSummary>) => (row.original.status === 'void' ? 'text-ink-muted' : undefined);

export interface InvoicesTableProps extends ListProps<InvoiceSummary, InvoiceListQuery> {
  hasFilters: boolean;
  /** Where a row's number links to. */
  hrefFor?: (invoice: InvoiceSummary) => string;
  /** The member's own view: no member column or member filter. */
  own?: boolean;
}

const MemberFilter = ({ value, onChange }: { value: string | undefined; onChange: (memberId: string | undefined) => void }) => {
  const members = useBillableMembers();
  return (
    <FilterField label="Member">
      <Select value={value ?? ''} onChange={(e) => onChange(e.target.value || undefined)} className="w-56">
        <option value="">Everyone</option>
        {(members.data ?? []).map((m) => (
          <option key={m.id} value={m.id}>
            {m.name}
          </option>
        ))}
      </Select>
    </FilterField>
  );
};

export const InvoicesToolbar = ({
  query,
  onQueryChange,
  hasFilters,
  onClearFilters,
  own = false,
}: Pick<InvoicesTableProps, 'query' | 'onQueryChange' | 'hasFilters' | 'own'> & { onClearFilters: () => void }) => (
  <div role="search" aria-label="Filter invoices" className="flex flex-wrap items-end gap-3">
    {!own ? (
      <ListSearch label="Search" fieldClassName="min-w-52 flex-1" query={query} onQueryChange={onQueryChange} placeholder="Number, member or e-mail" />
    ) : null}
    <FilterField label="Period">
      <Input type="month" value={query.period ?? ''} onChange={(e) => onQueryChange({ period: e.target.value || undefined })} className="w-44" />
    </FilterField>
    <QueryFilter
      name="status"
      label="Status"
      {...{ query, onQueryChange }}
      options={invoiceStatuses}
      labels={invoiceStatusLabels}
      anyLabel="Any"
      selectClassName="w-36"
    />
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
      <Button variant="ghost" onClick={onClearFilters}>
        Clear filters
      </Button>
    ) : null}
  </div>
);

export const InvoicesTable = ({ query, list, hasFilters, onQueryChange, hrefFor, own = false }: InvoicesTableProps) => {
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
      ...(own ? [] : [column.accessor('memberName', { id: 'member', header: 'Member', cell: nowrapCell, meta: { className: 'min-w-40' } })]),
      column.accessor('period', { header: 'Period', cell: ({ getValue }) => <span className="whitespace-nowrap">{periodLabel(getValue())}</span> }),
      column.accessor('issuedOn', { header: 'Invoice date', sortDescFirst: true, cell: dateCell }),
      column.accessor('dueOn', { header: 'Due', sortDescFirst: true, cell: dateCell }),
      column.accessor('status', {
        header: 'Status',
        cell: ({ row }) => <InvoiceStatusBadge status={row.original.status} overdue={row.original.overdue} partPaid={row.original.paidCents > 0} />,
      }),
      column.accessor('totalCents', {
        id: 'total',
        header: 'Total',
        sortDescFirst: true,
        cell: ({ row }) => <Money cents={row.original.totalCents} currency={row.original.currency} />,
        meta: figureMeta,
      }),
      column.accessor('amountDueCents', {
        id: 'amountDue',
        header: 'To pay',
        sortDescFirst: true,
        cell: ({ row }) =>
          row.original.status === 'issued' ? <Money cents={row.original.amountDueCents} currency={row.original.currency} className="font-medium" /> : <Dash />,
        meta: figureMeta,
      }),
    ],
    [hrefFor, own],
  );

  const empty = hasFilters ? 'No invoice matches these filters.' : 'No invoices yet.';
  return (
    <ListTable
      {...{ query, list, onQueryChange, columns, empty }}
      sortFields={invoiceSortFields}
      caption="Invoices"
      rowClassName={voidRow}
      noun={invoiceNoun}
    />
  );
};
