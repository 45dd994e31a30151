import { Link } from 'react-router-dom';
import { vesselStateLabels } from '../../../../shared/schemas/equipment.ts';
import { FilterField, FilterGrid, FilterSelect, ListPager, SearchInput, useListQuery } from '@/components/list-kit';
import { ButtonLink } from '@/components/ui/button';
import { LoadError } from '@/components/ui/data-table';
import { Spinner } from '@/components/ui/spinner';
import { useVesselStatus, vesselListQuery } from '@/features/sanitation/api/sanitation';
import { VesselKindFilter } from '@/features/sanitation/components/vessel-kind-filter';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { formatDateTime } from '@/utils/format';

const states = ['any', 'needs_cleaning', 'cleaned', 'ready', 'holding', 'out_of_service'] as const;
const stateLabels = { any: 'Any state', ...vesselStateLabels };

/** Every fermenter and keg with its sanitation standing; the ones to clean first. */
const SanitationVesselsRoute = () => {
  useDocumentTitle('Sanitation');
  const ability = useAppAbility();
  const { query, setQuery } = useListQuery(vesselListQuery);
  const list = useVesselStatus({ ...query, state: query.state === 'any' ? undefined : query.state });
  const canRecord = ability.can('create', 'SanitationCycle');
  return (
    <div className="flex flex-col gap-3">
      <FilterGrid>
        <FilterSelect label="State" value={query.state} onChange={(state) => setQuery({ state })} options={states} labels={stateLabels} anyLabel={null} />
        <VesselKindFilter value={query.kind} onChange={(kind) => setQuery({ kind })} />
        <FilterField label="Find">
          <SearchInput value={query.q} onSearch={(q, options) => setQuery({ q }, options)} placeholder="Code or name, e.g. K-012" />
        </FilterField>
      </FilterGrid>
      {list.isError && !list.isFetching ? (
        <LoadError what="The vessels" error={list.error} onRetry={() => void list.refetch()} />
      ) : list.isPending || (list.isError && list.isFetching) ? (
        <Spinner label="Loading the vessels" />
      ) : (
        <ul className="divide-y divide-line rounded-lg border border-line bg-surface" aria-label="Vessels">
          {list.data?.items.length === 0 ? <li className="px-3 py-6 text-center text-ink-muted">No vessel matches.</li> : null}
          {list.data?.items.map((v) => (
            <li key={v.id} className="flex flex-wrap items-center justify-between gap-3 px-3 py-3">
              <div className="min-w-0">
                <p className="flex flex-wrap items-center gap-2">
                  <Link to={v.kind === 'keg' ? cellarPaths.keg(v.id) : `/cellar/${v.id}`} className="text-base font-semibold">
                    {v.code}
                  </Link>
                  <StateBadge state={v.state} />
                  {v.state !== v.storedState ? <span className="text-xs text-due-strong">window lapsed</span> : null}
                </p>
                <p className="text-sm text-ink-muted">{v.name}</p>
                <p className="text-xs text-ink-muted">
                  {v.lastCycle ? `Last cycle ${formatDateTime(v.lastCycle.completedAt)} (${v.lastCycle.outcome.replace('_', ' ')})` : 'No cycle on record'}
                  {v.freshUntil && v.state === 'ready' ? ` · ready until ${formatDateTime(v.freshUntil)}` : ''}
                </p>
                {v.stateReason && v.state !== 'ready' ? <p className="text-xs text-ink-muted">{v.stateReason}</p> : null}
              </div>
              {canRecord && v.state !== 'holding' && v.state !== 'out_of_service' ? (
                <ButtonLink
                  to={cellarPaths.recordCycle(v.id)}
                  variant="secondary"
                  className="min-h-12 md:min-h-12 pointer-coarse:min-h-12"
                  aria-label={`Record a cycle on ${v.code}`}
                >
                  Record a cycle
                </ButtonLink>
              ) : null}
            </li>
          ))}
        </ul>
      )}
      <ListPager list={list} query={query} onQueryChange={setQuery} noun={['vessel', 'vessels']} pageSizes={false} />
    </div>
  );
};

export default SanitationVesselsRoute;
