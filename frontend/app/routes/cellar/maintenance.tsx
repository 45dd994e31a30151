import { createColumnHelper } from '@tanstack/react-table';
import { Link } from 'react-router-dom';
import { equipmentKindLabels } from '../../../../shared/schemas/equipment.ts';
import { inspectionKindLabels, maintenanceStatuses, type MaintenanceItem } from '../../../../shared/schemas/inspections.ts';
import { PageHeader } from '@/components/layouts/page-header';
import { ListTable, QueryFilter, useListQuery } from '@/components/list-kit';
import { parentPages } from '@/config/paths';
import { maintenanceListQuery, useMaintenanceList } from '@/features/equipment/api/inspections';
import { DueBadge } from '@/features/equipment/components/inspections-panel';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatDate } from '@/utils/format';

const column = createColumnHelper<MaintenanceItem>();
const sortFields = ['dueAt', 'code', 'kind'] as const;
const statusLabels = { failed: 'Failed', overdue: 'Past due', due_soon: 'Due soon' } as const;
const inspectedKinds = ['keg', 'fermenter', 'co2_cylinder'] as const;
const maintenanceIntro =
  'Pressure tests, relief-valve checks, seals and cylinder tests that failed, are past due or fall due soon. An item past due or failed may not be filled, carbonated, booked or connected until a passing inspection is recorded on its page.';
const maintenanceFilters = [
  { name: 'status', label: 'Status', options: maintenanceStatuses, labels: statusLabels, anyLabel: 'All' },
  { name: 'equipmentKind', label: 'Kind', options: inspectedKinds, labels: equipmentKindLabels, anyLabel: 'All kinds' },
] as const;
const maintenanceText = { caption: 'Inspections due', empty: 'Nothing failed, past due or due soon.', noun: 'inspections' };
const rowId = (r: MaintenanceItem) => `${r.equipment.id}-${r.kind}`;
const columns = [
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
];

/** The maintenance list: inspections failed, past due or due soon, most urgent first; each row opens the item to record one. */
const MaintenanceRoute = () => {
  useDocumentTitle('Maintenance · Cellar');
  const { query, setQuery } = useListQuery(maintenanceListQuery);
  const list = useMaintenanceList(query);
  return (
    <div className="flex flex-col gap-4">
      <PageHeader parent={parentPages.cellar} title="Maintenance" intro={maintenanceIntro} />
      <div className="flex flex-wrap items-end gap-3">
        {maintenanceFilters.map((filter) => (
          <QueryFilter key={filter.name} {...filter} query={query} onQueryChange={setQuery} muted className="w-[calc(50%-0.375rem)] sm:w-44" />
        ))}
      </div>
      <ListTable list={list} query={query} onQueryChange={setQuery} columns={columns} sortFields={sortFields} getRowId={rowId} {...maintenanceText} />
      <p className="text-xs text-ink-muted">
        Gas pressure can hurt: test only within the rating, with working relief valves. Local pressure-vessel codes and licensed testers come first.
      </p>
    </div>
  );
};

export default MaintenanceRoute;
