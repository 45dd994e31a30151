import { createColumnHelper } from '@tanstack/react-table';
import { Link } from 'react-router-dom';
import { kegSortFields, kegWhereabouts, kegWhereaboutsLabels, type KegView } from '../../../../shared/schemas/kegs.ts';
import { Dash, dateCell, FilterGrid, ListSearch, QueryFilter, ListTable, useListQuery } from '@/components/list-kit';
import { kegListQuery, useKegs } from '@/features/kegs/api/kegs';
import { FillGauge, Whereabouts } from '@/features/kegs/components/keg-bits';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { VesselStateFilter } from '@/features/equipment/components/vessel-state-filter';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatAbv, formatDate } from '@/utils/format';

const column = createColumnHelper<KegView>();

const kegListText = { caption: 'Kegs and where they are', empty: 'No keg matches.', noun: ['keg', 'kegs'] as const };
const columns = [
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
        <Dash />
      ),
  }),
  column.accessor((k) => k.contents?.remainingLiters ?? null, {
    id: 'remainingLiters',
    header: 'Left',
    cell: ({ row }) => <FillGauge keg={row.original} />,
  }),
  column.accessor('dueAt', { header: 'Due back', cell: dateCell }),
  column.display({
    id: 'carbonation',
    header: 'Carbonated by',
    cell: ({ row }) => <span className="whitespace-nowrap text-xs">{row.original.carbonation ? formatDate(row.original.carbonation.readyAt) : '—'}</span>,
  }),
];

/** The fleet: whereabouts, state, contents; sorted, filtered and paged on the server. */
const KegWhereaboutsRoute = () => {
  useDocumentTitle('Kegs');
  const { query, setQuery } = useListQuery(kegListQuery);
  const kegs = useKegs(query);

  return (
    <div className="flex flex-col gap-3">
      <FilterGrid>
        <QueryFilter
          name="whereabouts"
          label="Where"
          options={kegWhereabouts}
          labels={kegWhereaboutsLabels}
          anyLabel="Anywhere"
          query={query}
          onQueryChange={setQuery}
        />
        <VesselStateFilter value={query.state} onChange={(state) => setQuery({ state })} anyLabel="Any state" />
        <ListSearch label="Find" query={query} onQueryChange={setQuery} placeholder="Keg code or batch" />
      </FilterGrid>
      <ListTable list={kegs} query={query} onQueryChange={setQuery} columns={columns} sortFields={kegSortFields} {...kegListText} />
    </div>
  );
};

export default KegWhereaboutsRoute;
