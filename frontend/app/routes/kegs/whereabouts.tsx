import { createColumnHelper } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { kegSortFields, kegWhereabouts, kegWhereaboutsLabels, type KegView } from '../../../../shared/schemas/kegs.ts';
import { FilterField, FilterGrid, FilterSelect, ListTable, SearchInput, useListQuery } from '@/components/list-kit';
import { useServerTable } from '@/components/ui/use-server-table';
import { kegListQuery, useKegs } from '@/features/kegs/api/kegs';
import { FillGauge, Whereabouts } from '@/features/kegs/components/keg-bits';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { VesselStateFilter } from '@/features/equipment/components/vessel-state-filter';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { formatAbv, formatDate } from '@/utils/format';

const column = createColumnHelper<KegView>();

/** The fleet: whereabouts, state, contents; sorted, filtered and paged on the server. */
const KegWhereaboutsRoute = () => {
  useDocumentTitle('Kegs');
  const { query, setQuery } = useListQuery(kegListQuery);
  const kegs = useKegs(query);

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
  const table = useServerTable({ data: kegs.data, columns, query, onQueryChange: setQuery, sortFields: kegSortFields, getRowId: (k) => k.id });
  return (
    <div className="flex flex-col gap-3">
      <FilterGrid>
        <FilterSelect
          label="Where"
          value={query.whereabouts}
          onChange={(whereabouts) => setQuery({ whereabouts })}
          options={kegWhereabouts}
          labels={kegWhereaboutsLabels}
          anyLabel="Anywhere"
        />
        <VesselStateFilter value={query.state} onChange={(state) => setQuery({ state })} anyLabel="Any state" />
        <FilterField label="Find">
          <SearchInput value={query.q} onSearch={(q, options) => setQuery({ q }, options)} placeholder="Keg code or batch" />
        </FilterField>
      </FilterGrid>
      <ListTable
        table={table}
        caption="Kegs and where they are"
        list={kegs}
        query={query}
        onQueryChange={setQuery}
        empty="No keg matches."
        noun={['keg', 'kegs']}
      />
    </div>
  );
};

export default KegWhereaboutsRoute;
