import type { RowSelectionState } from '@tanstack/react-table';
import { useEffect, useState } from 'react';
import { Link } from 'react-router-dom';
import {
  equipmentKindLabels,
  equipmentKinds,
  equipmentKindSchema,
  vesselStateLabels,
  vesselStates,
  vesselStateSchema,
  type Equipment,
} from '../../../../shared/schemas/equipment.ts';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import { useNotice } from '@/components/ui/notice';
import { labelSheetHref, useEquipmentList } from '@/features/equipment/api/get-equipment-list';
import { EquipmentAddDialog } from '@/features/equipment/components/equipment-add-dialog';
import { EquipmentTable } from '@/features/equipment/components/equipment-table';
import { useEquipmentSearchParams } from '@/features/equipment/hooks/use-equipment-search-params';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { pluralize } from '@/utils/format';

const labelClass = 'flex flex-col gap-1 text-xs font-medium text-ink-muted';

/** Cellar: every fermenter, keg, tap position and CO2 cylinder with its state; QR labels for any selection. */
const CellarRoute = () => {
  useDocumentTitle('Cellar');
  const { query, setQuery } = useEquipmentSearchParams();
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
  const [text, setText] = useState(query.q ?? '');
  useEffect(() => setText(query.q ?? ''), [query.q]);
  useEffect(() => {
    const value = text.trim();
    if (value === (query.q ?? '')) return;
    const timer = setTimeout(() => setQuery({ q: value || undefined }, { replace: true }), 300);
    return () => clearTimeout(timer);
  }, [text, query.q, setQuery]);

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
        <label className={`${labelClass} w-full sm:w-56`}>
          Search
          <Input type="search" value={text} onChange={(e) => setText(e.target.value)} placeholder="Code, name or notes" autoComplete="off" />
        </label>
        <label className={`${labelClass} w-[calc(50%-0.375rem)] sm:w-44`}>
          Kind
          <Select value={query.kind ?? ''} onChange={(e) => setQuery({ kind: equipmentKindSchema.safeParse(e.target.value).data })}>
            <option value="">All kinds</option>
            {equipmentKinds.map((k) => (
              <option key={k} value={k}>
                {equipmentKindLabels[k]}
              </option>
            ))}
          </Select>
        </label>
        <label className={`${labelClass} w-[calc(50%-0.375rem)] sm:w-44`}>
          State
          <Select value={query.state ?? ''} onChange={(e) => setQuery({ state: vesselStateSchema.safeParse(e.target.value).data })}>
            <option value="">All states</option>
            {vesselStates.map((s) => (
              <option key={s} value={s}>
                {vesselStateLabels[s]}
              </option>
            ))}
          </Select>
        </label>
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
      <EquipmentTable
        query={query}
        data={list.data}
        isLoading={list.isPending}
        error={list.error}
        onRetry={() => void list.refetch()}
        isFetching={list.isFetching}
        isPlaceholderData={list.isPlaceholderData}
        onQueryChange={setQuery}
        selection={selection}
        onSelectionChange={setSelection}
      />
      <p className="text-xs text-ink-muted">
        Labels print on A4 sheets of 3 × 8 labels, 70 × 37 mm. Kegs, cylinders and taps carry the pressure and CO2 cautions; local codes and licensed practice
        come first.
      </p>
    </div>
  );
};

export default CellarRoute;
