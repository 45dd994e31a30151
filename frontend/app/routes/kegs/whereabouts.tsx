import { createColumnHelper } from '@tanstack/react-table';
import { useServerTable } from '@/components/ui/use-server-table';
import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { vesselStateLabels } from '../../../../shared/schemas/equipment.ts';
import { kegSortFields, kegWhereabouts, kegWhereaboutsLabels, type KegView } from '../../../../shared/schemas/kegs.ts';
import { DataTable, DataTablePagination } from '@/components/ui/data-table';
import { Input, Select } from '@/components/ui/input';
import { useKegs } from '@/features/kegs/api/kegs';
import { FillGauge, Whereabouts } from '@/features/kegs/components/keg-bits';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatAbv, formatDate } from '@/utils/format';

type SortField = (typeof kegSortFields)[number];
const column = createColumnHelper<KegView>();

/** The fleet: whereabouts, state, contents; sorted, filtered and paged on the server. */
const KegWhereaboutsRoute = () => {
  useDocumentTitle('Kegs');
  const [sort, setSort] = useState<SortField>('code');
  const [order, setOrder] = useState<'asc' | 'desc'>('asc');
  const [page, setPage] = useState(1);
  const [pageSize, setPageSize] = useState(50);
  const [where, setWhere] = useState('');
  const [state, setState] = useState('');
  const [q, setQ] = useState('');
  const kegs = useKegs({ sort, order, page, pageSize, whereabouts: (where || undefined) as never, state: (state || undefined) as never, q: q || undefined });

  const columns = useMemo(
    () => [
      column.accessor('code', {
        header: 'Keg',
        cell: ({ row }) => (
          <Link to={cellarPaths.keg(row.original.id)} className="font-semibold whitespace-nowrap">
            {row.original.code}
          </Link>
        ),
      }),
      column.accessor('state', { header: 'State', cell: ({ row }) => <StateBadge state={row.original.state} /> }),
      column.accessor('whereabouts', { header: 'Where', cell: ({ row }) => <Whereabouts keg={row.original} /> }),
      column.display({
        id: 'contents',
        header: 'Holds',
        cell: ({ row }) =>
          row.original.contents ? (
            <span className="flex flex-col">
              <span>{row.original.contents.batchName}</span>
              <span className="text-xs text-ink-muted">
                {row.original.contents.abv !== null ? formatAbv(row.original.contents.abv) : row.original.contents.style}
              </span>
            </span>
          ) : (
            <span className="text-ink-muted">—</span>
          ),
      }),
      column.accessor((k) => k.contents?.remainingLiters ?? null, {
        id: 'remainingLiters',
        header: 'Left',
        cell: ({ row }) => <FillGauge keg={row.original} />,
      }),
      column.accessor('dueAt', { header: 'Due back', cell: ({ getValue }) => <span className="whitespace-nowrap">{formatDate(getValue())}</span> }),
      column.display({
        id: 'carbonation',
        header: 'Carbonated by',
        cell: ({ row }) => <span className="whitespace-nowrap text-xs">{row.original.carbonation ? formatDate(row.original.carbonation.readyAt) : '—'}</span>,
      }),
    ],
    [],
  );
  const table = useServerTable({
    data: kegs.data,
    columns,
    query: { page, pageSize, sort, order },
    onQueryChange: (q) => (setSort(q.sort), setOrder(q.order), setPage(1)),
    isSortField: (id): id is SortField => (kegSortFields as readonly string[]).includes(id),
    getRowId: (k) => k.id,
  });
  return (
    <div className="flex flex-col gap-3">
      <div className="grid gap-2 sm:grid-cols-[12rem_12rem_1fr]">
        <label className="flex flex-col gap-1 text-sm font-medium">
          Where
          <Select value={where} onChange={(e) => (setWhere(e.target.value), setPage(1))}>
            <option value="">Anywhere</option>
            {kegWhereabouts.map((w) => (
              <option key={w} value={w}>
                {kegWhereaboutsLabels[w]}
              </option>
            ))}
          </Select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          State
          <Select value={state} onChange={(e) => (setState(e.target.value), setPage(1))}>
            <option value="">Any state</option>
            {(['ready', 'needs_cleaning', 'cleaned', 'holding', 'out_of_service'] as const).map((s) => (
              <option key={s} value={s}>
                {vesselStateLabels[s]}
              </option>
            ))}
          </Select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Find
          <Input type="search" value={q} placeholder="Keg code or batch" onChange={(e) => (setQ(e.target.value), setPage(1))} />
        </label>
      </div>
      <DataTable
        table={table}
        caption="Kegs and where they are"
        isLoading={kegs.isPending}
        error={kegs.error}
        onRetry={() => void kegs.refetch()}
        isFetching={kegs.isFetching}
        empty="No keg matches."
      />
      <DataTablePagination
        page={page}
        pageSize={pageSize}
        total={kegs.data?.total ?? 0}
        onPageChange={setPage}
        onPageSizeChange={(s) => (setPageSize(s), setPage(1))}
        isPlaceholder={kegs.isPlaceholderData}
        noun={['keg', 'kegs']}
      />
    </div>
  );
};

export default KegWhereaboutsRoute;
