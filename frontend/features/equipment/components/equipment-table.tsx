import { createColumnHelper, type Row, type RowSelectionState, type TableOptions } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { equipmentKindLabels, equipmentSortFields, type Equipment, type EquipmentListQuery } from '../../../../shared/schemas/equipment.ts';
import { Dash, dateTimeCell, ListTable, type ListProps } from '@/components/list-kit';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useUnits } from '@/hooks/use-units';

export interface EquipmentTableProps extends ListProps<Equipment, EquipmentListQuery> {
  selection: RowSelectionState;
  onSelectionChange: (next: RowSelectionState) => void;
}

const column = createColumnHelper<Equipment>();
const equipmentListText = { caption: "The co-op's equipment", empty: 'No equipment matches these filters.', noun: 'items' };
const outOfService = (row: Row<Equipment>) => (row.original.state === 'out_of_service' ? 'text-ink-muted' : undefined);

/** The kind's facts in a few words: "conical, valve", "ball lock, LY19-…", "4.0 m × 4.8 mm line". */
/** An attribute as text; attributes are free-form JSON, so anything but a string or number shows as nothing. */
const text = (v: unknown) => (typeof v === 'string' || typeof v === 'number' ? String(v) : '');

function facts(item: Equipment): string {
  const a = item.attributes;
  switch (item.kind) {
    case 'fermenter':
      return [a.style, a.hasValve ? 'bottom valve' : 'no valve'].filter(Boolean).join(', ');
    case 'keg':
      return [a.lock ? `${text(a.lock)} lock` : null, a.serial].filter(Boolean).join(', ');
    case 'tap':
      return [a.position, a.lineLengthM ? `${text(a.lineLengthM)} m × ${text(a.lineInsideDiameterMm)} mm line` : null].filter(Boolean).join(' · ');
    case 'co2_cylinder':
      return [
        a.sizeKg ? `${text(a.sizeKg)} kg` : null,
        a.fillPercent !== undefined ? `${text(a.fillPercent)} % full` : null,
        a.hydroTestDue ? `test due ${text(a.hydroTestDue)}` : null,
      ]
        .filter(Boolean)
        .join(', ');
  }
}

export const EquipmentTable = ({ query, list, onQueryChange, selection, onSelectionChange }: EquipmentTableProps) => {
  const units = useUnits();
  const columns = useMemo(
    () => [
      column.display({
        id: 'select',
        header: ({ table }) => (
          <input
            type="checkbox"
            className="size-4 accent-copper"
            aria-label="Select every item on this page"
            checked={table.getIsAllPageRowsSelected()}
            ref={(el) => {
              if (el) el.indeterminate = table.getIsSomePageRowsSelected();
            }}
            onChange={table.getToggleAllPageRowsSelectedHandler()}
          />
        ),
        cell: ({ row }) => (
          <input
            type="checkbox"
            className="size-4 accent-copper"
            aria-label={`Select ${row.original.code}`}
            checked={row.getIsSelected()}
            onChange={row.getToggleSelectedHandler()}
          />
        ),
        meta: { className: 'w-px' },
      }),
      column.accessor('code', {
        header: 'Code',
        cell: ({ row }) => (
          <Link to={`/cellar/${row.original.id}`} className="font-semibold whitespace-nowrap">
            {row.original.code}
          </Link>
        ),
      }),
      column.accessor('name', { header: 'Name', meta: { className: 'min-w-44' } }),
      column.accessor('kind', { header: 'Kind', cell: ({ getValue }) => equipmentKindLabels[getValue()] }),
      column.accessor('capacityLiters', {
        header: 'Capacity',
        sortDescFirst: true,
        cell: ({ getValue }) => (getValue() ? units.volume(getValue()) : <Dash />),
        meta: { className: 'text-right whitespace-nowrap' },
      }),
      column.accessor('state', { header: 'State', cell: ({ getValue }) => <StateBadge state={getValue()} /> }),
      column.display({ id: 'facts', header: 'Details', cell: ({ row }) => <span className="text-ink-muted">{facts(row.original)}</span> }),
      column.accessor('stateChangedAt', { header: 'State since', sortDescFirst: true, cell: dateTimeCell }),
    ],
    [units],
  );

  const tableOptions: Partial<TableOptions<Equipment>> = {
    enableRowSelection: true,
    state: { rowSelection: selection },
    onRowSelectionChange: (updater) => onSelectionChange(typeof updater === 'function' ? updater(selection) : updater),
  };
  return (
    <ListTable {...{ query, list, onQueryChange, columns, tableOptions }} sortFields={equipmentSortFields} rowClassName={outOfService} {...equipmentListText} />
  );
};
