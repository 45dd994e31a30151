import { createColumnHelper } from '@tanstack/react-table';
import { useServerTable } from '@/components/ui/use-server-table';
import { useMemo, useState } from 'react';
import { sanitationStepLabels } from '../../../../shared/schemas/cellar-settings.ts';
import { sanitationCycleSortFields, type SanitationCycleView } from '../../../../shared/schemas/sanitation.ts';
import { Badge } from '@/components/ui/badge';
import { DataTable, DataTablePagination } from '@/components/ui/data-table';
import { Input, Select } from '@/components/ui/input';
import { useCycles } from '@/features/sanitation/api/sanitation';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatDateTime } from '@/utils/format';

type SortField = (typeof sanitationCycleSortFields)[number];
const column = createColumnHelper<SanitationCycleView>();
const outcomeTone = { ready: 'ready', cleaned: 'muted', needs_cleaning: 'due' } as const;
const outcomeLabel = { ready: 'Complete', cleaned: 'Cleaned only', needs_cleaning: 'Incomplete' } as const;

const minutes = (m: number | null) => (m === null ? '' : m < 1 ? ` ${Math.round(m * 60)} s` : ` ${m} min`);

/** The sanitation log: every cycle, newest first, sorted, filtered and paged on the server. */
const SanitationLogRoute = () => {
  useDocumentTitle('Sanitation log');
  const [sort, setSort] = useState<SortField>('completedAt');
  const [order, setOrder] = useState<'asc' | 'desc'>('desc');
  const [page, setPage] = useState(1);
  const [pageSize, setPageSize] = useState(50);
  const [outcome, setOutcome] = useState<'' | 'ready' | 'cleaned' | 'needs_cleaning'>('');
  const [kind, setKind] = useState<'' | 'fermenter' | 'keg'>('');
  const [q, setQ] = useState('');
  const cycles = useCycles({ sort, order, page, pageSize, outcome: outcome || undefined, kind: kind || undefined, q: q || undefined });

  const columns = useMemo(
    () => [
      column.accessor('completedAt', {
        header: 'Completed',
        sortDescFirst: true,
        cell: ({ getValue }) => <time className="whitespace-nowrap">{formatDateTime(getValue())}</time>,
      }),
      column.accessor((c) => c.equipment.code, {
        id: 'equipmentCode',
        header: 'Vessel',
        cell: ({ row }) => (
          <span className="whitespace-nowrap font-medium">
            {row.original.equipment.code} <span className="font-normal text-ink-muted">{row.original.equipment.kind}</span>
          </span>
        ),
      }),
      column.accessor('outcome', {
        header: 'Outcome',
        cell: ({ row }) => <Badge tone={outcomeTone[row.original.outcome]}>{outcomeLabel[row.original.outcome]}</Badge>,
      }),
      column.display({
        id: 'steps',
        header: 'Steps',
        cell: ({ row }) => (
          <ul className="text-xs md:min-w-72">
            {row.original.steps.map((s, i) => (
              <li key={i} className={s.ok ? undefined : 'text-due-strong'}>
                <span className="font-medium">{sanitationStepLabels[s.step]}</span>
                {s.chemical ? ` · ${s.chemical}` : ''}
                {s.concentration !== null ? ` ${s.concentration}${s.concentrationUnit ? ` ${s.concentrationUnit}` : ''}` : ''}
                {s.step === 'purge' ? (s.purgeMethod === 'push_out' ? ' · push-out' : minutes(s.contactMinutes)) : minutes(s.contactMinutes)}
                {' · '}
                {s.performedBy?.name ?? '—'}, {formatDateTime(s.at)}
              </li>
            ))}
            {row.original.issues.length ? <li className="text-due-strong">{row.original.issues.map((i) => i.message).join(' ')}</li> : null}
          </ul>
        ),
      }),
      column.accessor((c) => c.recordedBy?.name ?? '', { id: 'recordedBy', header: 'Recorded by', enableSorting: false }),
    ],
    [],
  );
  const table = useServerTable({
    data: cycles.data,
    columns,
    query: { page, pageSize, sort, order },
    onQueryChange: (q) => (setSort(q.sort), setOrder(q.order), setPage(1)),
    isSortField: (id): id is SortField => (sanitationCycleSortFields as readonly string[]).includes(id),
    getRowId: (c) => c.id,
  });
  return (
    <div className="flex flex-col gap-3">
      <div className="grid gap-2 sm:grid-cols-[12rem_12rem_1fr]">
        <label className="flex flex-col gap-1 text-sm font-medium">
          Outcome
          <Select value={outcome} onChange={(e) => (setOutcome(e.target.value as typeof outcome), setPage(1))}>
            <option value="">Any</option>
            <option value="ready">Complete</option>
            <option value="cleaned">Cleaned only</option>
            <option value="needs_cleaning">Incomplete</option>
          </Select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Kind
          <Select value={kind} onChange={(e) => (setKind(e.target.value as typeof kind), setPage(1))}>
            <option value="">Fermenters and kegs</option>
            <option value="fermenter">Fermenters</option>
            <option value="keg">Kegs</option>
          </Select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Vessel
          <Input type="search" value={q} placeholder="Code or name" onChange={(e) => (setQ(e.target.value), setPage(1))} />
        </label>
      </div>
      <DataTable
        table={table}
        caption="Sanitation cycles"
        isLoading={cycles.isPending}
        error={cycles.error}
        onRetry={() => void cycles.refetch()}
        isFetching={cycles.isFetching}
        empty="No cycles match."
      />
      <DataTablePagination
        page={page}
        pageSize={pageSize}
        total={cycles.data?.total ?? 0}
        onPageChange={setPage}
        onPageSizeChange={(s) => (setPageSize(s), setPage(1))}
        isPlaceholder={cycles.isPlaceholderData}
        noun={['cycle', 'cycles']}
      />
    </div>
  );
};

export default SanitationLogRoute;
