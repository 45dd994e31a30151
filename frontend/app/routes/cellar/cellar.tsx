import type { RowSelectionState } from '@tanstack/react-table';
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { equipmentKindLabels, equipmentKinds, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { ListSearch, QueryFilter, useListQuery } from '@/components/list-kit';
import { Button } from '@/components/ui/button';
import { useNotice } from '@/components/ui/notice';
import { equipmentListQuery, labelSheetHref, useEquipmentList } from '@/features/equipment/api/get-equipment-list';
import { EquipmentAddDialog } from '@/features/equipment/components/equipment-add-dialog';
import { EquipmentTable } from '@/features/equipment/components/equipment-table';
import { VesselStateFilter } from '@/features/equipment/components/vessel-state-filter';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { pluralize } from '@/utils/format';

/** Cellar: every fermenter, keg, tap position and CO2 cylinder with its state; QR labels for any selection. */
/** The Kind and State filters: half the row each on a phone. */
const halfWidthFilter = { muted: true, className: 'w-[calc(50%-0.375rem)] sm:w-44' };

const CellarRoute = () => {
  useDocumentTitle('Cellar');
  const { query, setQuery } = useListQuery(equipmentListQuery);
  const list = useEquipmentList(query);
  const [selection, setSelection] = useState<RowSelectionState>({});
  const ability = useAppAbility();
  const [adding, setAdding] = useState(false);
  const notice = useNotice();
  const onCreated = (added: Equipment) =>
    notice.show({
      title: `${added.code} is in the registry`,
      text: (
        <>
          {added.name}, {equipmentKindLabels[added.kind].toLowerCase()}, starts as “Needs cleaning”. <Link to={`/cellar/${added.id}`}>Open {added.code}</Link>
        </>
      ),
    });
  const selected = Object.keys(selection).filter((id) => selection[id]);
  return (
    <div className="flex flex-col gap-4">
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-2xl">Cellar</h1>
          <p className="mt-1 text-ink-muted">Every vessel and where it stands. Tick items to print QR labels that open their page on a phone.</p>
          <Link to="/cellar/maintenance" className="text-sm">
            Maintenance: inspections due
          </Link>
        </div>
        {ability.can('create', 'Equipment') ? <Button onClick={() => setAdding(true)}>Add equipment</Button> : null}
      </header>
      {ability.can('create', 'Equipment') ? <EquipmentAddDialog open={adding} onClose={() => setAdding(false)} onCreated={onCreated} /> : null}
      <div className="flex flex-wrap items-end gap-3">
        <ListSearch label="Search" muted fieldClassName="w-full sm:w-56" query={query} onQueryChange={setQuery} placeholder="Code, name or notes" />
        <QueryFilter
          name="kind"
          label="Kind"
          options={equipmentKinds}
          labels={equipmentKindLabels}
          anyLabel="All kinds"
          {...halfWidthFilter}
          {...{ query, onQueryChange: setQuery }}
        />
        <VesselStateFilter value={query.state} onChange={(state) => setQuery({ state })} anyLabel="All states" {...halfWidthFilter} />
        <div className="ml-auto flex items-center gap-2">
          {selected.length ? (
            <Button variant="ghost" onClick={() => setSelection({})}>
              Clear selection
            </Button>
          ) : null}
          <a
            className={`inline-flex min-h-11 items-center rounded-md px-4 text-sm font-medium no-underline hover:no-underline md:min-h-9 ${selected.length ? 'bg-copper text-white hover:bg-copper-strong' : 'pointer-events-none border border-line-strong text-ink-muted opacity-60'}`}
            href={selected.length ? labelSheetHref(selected) : undefined}
            target="_blank"
            rel="noreferrer"
            aria-disabled={selected.length === 0}
          >
            {selected.length ? `Print ${pluralize(selected.length, 'label')} (PDF)` : 'Select items to print labels'}
          </a>
        </div>
      </div>
      <EquipmentTable query={query} list={list} onQueryChange={setQuery} selection={selection} onSelectionChange={setSelection} />
      <p className="text-xs text-ink-muted">
        Labels print on A4 sheets of 3 × 8 labels, 70 × 37 mm. Kegs, cylinders and taps carry the pressure and CO2 cautions; local codes and licensed practice
        come first.
      </p>
    </div>
  );
};

export default CellarRoute;
