import { createColumnHelper } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { equipmentKindLabels } from '../../../../shared/schemas/equipment.ts';
import {
  inspectionKindLabels,
  maintenanceListQuerySchema,
  maintenanceStatuses,
  type MaintenanceItem,
  type MaintenanceListQuery,
} from '../../../../shared/schemas/inspections.ts';
import { DataTable, DataTablePagination } from '@/components/ui/data-table';
import { Select } from '@/components/ui/input';
import { useServerTable } from '@/components/ui/use-server-table';
import { useMaintenanceList } from '@/features/equipment/api/inspections';
import { DueBadge } from '@/features/equipment/components/inspections-panel';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatDate } from '@/utils/format';

const column = createColumnHelper<MaintenanceItem>();
const sortFields = ['dueAt', 'code', 'kind'] as const;
const isSortField = (id: string): id is (typeof sortFields)[number] => (sortFields as readonly string[]).includes(id);
const statusLabels = { failed: 'Failed', overdue: 'Past due', due_soon: 'Due soon' } as const;
const labelClass = 'flex flex-col gap-1 text-xs font-medium text-ink-muted';

/** The maintenance list: inspections failed, past due or due soon, most urgent first; each row opens the item to record one. */
const MaintenanceRoute = () => {
  useDocumentTitle('Maintenance · Cellar');
  const [params, setParams] = useSearchParams();
  const parsed = maintenanceListQuerySchema.safeParse(Object.fromEntries(params));
  const query: MaintenanceListQuery = parsed.success ? parsed.data : maintenanceListQuerySchema.parse({});
  const list = useMaintenanceList(query);
  const setQuery = (patch: Partial<Record<keyof MaintenanceListQuery, string | number | undefined>>) => {
    const next = new URLSearchParams(params);
    for (const [k, v] of Object.entries(patch)) {
      if (v === undefined || v === '') next.delete(k);
      else next.set(k, String(v));
    }
    if (patch.page === undefined) next.delete('page');
    setParams(next);
  };
  const columns = useMemo(
    () => [
      column.accessor((r) => r.equipment.code, {
        id: 'code',
        header: 'Item',
        cell: ({ row }) => (
          <Link to={`/cellar/${row.original.equipment.id}`} className="font-semibold whitespace-nowrap">
            {row.original.equipment.code}
          </Link>
        ),
      }),
      column.display({ id: 'what', header: 'Kind', cell: ({ row }) => equipmentKindLabels[row.original.equipment.kind] }),
      column.accessor('kind', { header: 'Inspection', cell: ({ getValue }) => inspectionKindLabels[getValue()] }),
      column.accessor('dueAt', { header: 'Due', cell: ({ getValue }) => <span className="whitespace-nowrap">{formatDate(getValue(), 'failed')}</span> }),
      column.accessor('status', { header: 'Status', enableSorting: false, cell: ({ getValue }) => <DueBadge due={{ status: getValue() }} /> }),
      column.display({ id: 'state', header: 'State', cell: ({ row }) => <StateBadge state={row.original.equipment.state as never} /> }),
    ],
    [],
  );
  const table = useServerTable({
    data: list.data,
    columns,
    query,
    onQueryChange: (p) => setQuery(p),
    isSortField,
    getRowId: (r) => `${r.equipment.id}-${r.kind}`,
  });
  return (
    <div className="flex flex-col gap-4">
      <nav className="text-sm">
        <Link to="/cellar">Cellar</Link> <span className="text-ink-faint">/</span> Maintenance
      </nav>
      <header>
        <h1 className="text-2xl">Maintenance</h1>
        <p className="mt-1 text-ink-muted">
          Pressure tests, relief-valve checks, seals and cylinder tests that failed, are past due or fall due soon. An item past due or failed may not be
          filled, carbonated, booked or connected until a passing inspection is recorded on its page.
        </p>
      </header>
      <div className="flex flex-wrap items-end gap-3">
        <label className={`${labelClass} w-[calc(50%-0.375rem)] sm:w-44`}>
          Status
          <Select value={query.status ?? ''} onChange={(e) => setQuery({ status: e.target.value || undefined })}>
            <option value="">All</option>
            {maintenanceStatuses.map((s) => (
              <option key={s} value={s}>
                {statusLabels[s]}
              </option>
            ))}
          </Select>
        </label>
        <label className={`${labelClass} w-[calc(50%-0.375rem)] sm:w-44`}>
          Kind
          <Select value={query.equipmentKind ?? ''} onChange={(e) => setQuery({ equipmentKind: e.target.value || undefined })}>
            <option value="">All kinds</option>
            {(['keg', 'fermenter', 'co2_cylinder'] as const).map((k) => (
              <option key={k} value={k}>
                {equipmentKindLabels[k]}
              </option>
            ))}
          </Select>
        </label>
      </div>
      <DataTable
        table={table}
        caption="Inspections due"
        isLoading={list.isPending}
        error={list.error}
        onRetry={() => void list.refetch()}
        isFetching={list.isFetching}
        empty="Nothing failed, past due or due soon."
      />
      <DataTablePagination
        page={query.page}
        pageSize={query.pageSize}
        total={list.data?.total ?? 0}
        isPlaceholder={list.isPlaceholderData}
        onPageChange={(page) => setQuery({ page })}
        onPageSizeChange={(pageSize) => setQuery({ pageSize })}
        noun="inspections"
      />
      <p className="text-xs text-ink-muted">
        Gas pressure can hurt: test only within the rating, with working relief valves. Local pressure-vessel codes and licensed testers come first.
      </p>
    </div>
  );
};

export default MaintenanceRoute;
