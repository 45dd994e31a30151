import { createColumnHelper } from '@tanstack/react-table';
import { sanitationStepLabels } from '../../../../shared/schemas/cellar-settings.ts';
import { cycleOutcomes, sanitationCycleSortFields, type SanitationCycleView } from '../../../../shared/schemas/sanitation.ts';
import { dateTimeCell, FilterGrid, ListSearch, QueryFilter, ListTable, useListQuery } from '@/components/list-kit';
import { Badge } from '@/components/ui/badge';
import { cycleListQuery, useCycles } from '@/features/sanitation/api/sanitation';
import { VesselKindFilter } from '@/features/sanitation/components/vessel-kind-filter';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatDateTime } from '@/utils/format';

const column = createColumnHelper<SanitationCycleView>();
const outcomeTone = { ready: 'ready', cleaned: 'muted', needs_cleaning: 'due' } as const;
const outcomeLabel = { ready: 'Complete', cleaned: 'Cleaned only', needs_cleaning: 'Incomplete' } as const;

const minutes = (m: number | null) => (m === null ? '' : m < 1 ? ` ${Math.round(m * 60)} s` : ` ${m} min`);

const cycleListText = { caption: 'Sanitation cycles', empty: 'No cycles match.', noun: ['cycle', 'cycles'] as const };
const columns = [
  column.accessor('completedAt', { header: 'Completed', sortDescFirst: true, cell: dateTimeCell }),
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
];

/** The sanitation log: every cycle, newest first, sorted, filtered and paged on the server. */
const SanitationLogRoute = () => {
  useDocumentTitle('Sanitation log');
  const { query, setQuery } = useListQuery(cycleListQuery);
  const cycles = useCycles(query);

  return (
    <div className="flex flex-col gap-3">
      <FilterGrid>
        <QueryFilter name="outcome" label="Outcome" options={cycleOutcomes} labels={outcomeLabel} anyLabel="Any" query={query} onQueryChange={setQuery} />
        <VesselKindFilter value={query.kind} onChange={(kind) => setQuery({ kind })} />
        <ListSearch label="Vessel" query={query} onQueryChange={setQuery} placeholder="Code or name" />
      </FilterGrid>
      <ListTable list={cycles} query={query} onQueryChange={setQuery} columns={columns} sortFields={sanitationCycleSortFields} {...cycleListText} />
    </div>
  );
};

export default SanitationLogRoute;
