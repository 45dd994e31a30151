import { useState } from 'react';
import { Link } from 'react-router-dom';
import { vesselStateLabels, type VesselState } from '../../../../shared/schemas/equipment.ts';
import { ButtonLink } from '@/components/ui/button';
import { DataTablePagination, LoadError } from '@/components/ui/data-table';
import { Input, Select } from '@/components/ui/input';
import { Spinner } from '@/components/ui/spinner';
import { useVesselStatus } from '@/features/sanitation/api/sanitation';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { formatDateTime } from '@/utils/format';

const states: VesselState[] = ['needs_cleaning', 'cleaned', 'ready', 'holding', 'out_of_service'];

/** Every fermenter and keg with its sanitation standing; the ones to clean first. */
const SanitationVesselsRoute = () => {
  useDocumentTitle('Sanitation');
  const ability = useAppAbility();
  const [kind, setKind] = useState<'' | 'fermenter' | 'keg'>('');
  const [state, setState] = useState<string>('needs_cleaning');
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  const list = useVesselStatus({ kind: kind || undefined, state: state || undefined, q: q || undefined, sort: 'code', order: 'asc', page, pageSize: 25 });
  const canRecord = ability.can('create', 'SanitationCycle');
  return (
    <div className="flex flex-col gap-3">
      <div className="grid gap-2 sm:grid-cols-[12rem_12rem_1fr]">
        <label className="flex flex-col gap-1 text-sm font-medium">
          State
          <Select value={state} onChange={(e) => (setState(e.target.value), setPage(1))}>
            <option value="">Any state</option>
            {states.map((s) => (
              <option key={s} value={s}>
                {vesselStateLabels[s]}
              </option>
            ))}
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
          Find
          <Input type="search" value={q} placeholder="Code or name, e.g. K-012" onChange={(e) => (setQ(e.target.value), setPage(1))} />
        </label>
      </div>
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
      <DataTablePagination
        page={page}
        pageSize={25}
        total={list.data?.total ?? 0}
        onPageChange={setPage}
        noun={['vessel', 'vessels']}
        isPlaceholder={list.isPlaceholderData}
      />
    </div>
  );
};

export default SanitationVesselsRoute;
