import { useEffect, useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { Button, ButtonLink } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useBatches } from '@/features/batches/api/get-batches';
import { BatchesTable, BatchesToolbar } from '@/features/batches/components/batches-table';
import { BatchFormDialog } from '@/features/batches/components/batch-form-dialog';
import { useBatchesSearchParams } from '@/features/batches/hooks/use-batches-search-params';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';

/** Batches: a member's own, or every member's for the brewer on duty, treasurer and admin. */
const BatchesRoute = () => {
  useDocumentTitle('Batches');
  const ability = useAppAbility();
  const navigate = useNavigate();
  const { query, setQuery } = useBatchesSearchParams();
  const batches = useBatches(query);
  const [creating, setCreating] = useState(false);
  const seesAll = canOnEvery(ability, 'read', 'Batch');

  const total = batches.data?.total ?? 0;
  const count = batches.data?.items.length ?? 0;
  useEffect(() => {
    if (batches.isPlaceholderData || !batches.data || count > 0 || query.page <= 1) return;
    const last = Math.max(1, Math.ceil(total / query.pageSize));
    if (last !== query.page) setQuery({ page: last }, { replace: true });
  }, [batches.isPlaceholderData, batches.data, count, total, query.page, query.pageSize, setQuery]);

  return (
    <div className="flex flex-col gap-4">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl">Batches</h1>
          <p className="text-sm text-ink-muted">{seesAll ? 'Every member’s batches and their gravity.' : 'Your batches and their gravity.'}</p>
        </div>
        <div className="flex flex-wrap gap-2">
          {ability.can('read', 'ProductionRecord') ? (
            <ButtonLink to={paths.productionRecords} variant="secondary">
              Production records
            </ButtonLink>
          ) : null}
          {ability.can('create', 'Batch') ? <Button onClick={() => setCreating(true)}>New batch</Button> : null}
        </div>
      </header>
      <BatchesToolbar query={query} onQueryChange={setQuery} showMine={seesAll && ability.can('create', 'Batch')} />
      <BatchesTable
        query={query}
        data={batches.data}
        isLoading={batches.isPending}
        error={batches.error}
        onRetry={() => void batches.refetch()}
        isFetching={batches.isFetching}
        isPlaceholderData={batches.isPlaceholderData}
        showOwner={seesAll}
        onQueryChange={setQuery}
      />
      <BatchFormDialog
        open={creating}
        onClose={() => setCreating(false)}
        onSaved={(batch) => {
          setCreating(false);
          void navigate(`${paths.batches}/${batch.id}`);
        }}
      />
    </div>
  );
};

export default BatchesRoute;
