import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { useClampPage, useListQuery } from '@/components/list-kit';
import { Button, ButtonLink } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { batchListQuery, useBatches } from '@/features/batches/api/get-batches';
import { BatchesTable, BatchesToolbar } from '@/features/batches/components/batches-table';
import { BatchFormDialog } from '@/features/batches/components/batch-form-dialog';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';

/** Batches: a member's own, or every member's for the brewer on duty, treasurer and admin. */
const BatchesRoute = () => {
  useDocumentTitle('Batches');
  const ability = useAppAbility();
  const navigate = useNavigate();
  const { query, setQuery, hasFilters, clearFilters } = useListQuery(batchListQuery);
  const batches = useBatches(query);
  const [creating, setCreating] = useState(false);
  const seesAll = canOnEvery(ability, 'read', 'Batch');

  useClampPage(batches, query, setQuery);

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
      <BatchesToolbar
        query={query}
        onQueryChange={setQuery}
        hasFilters={hasFilters}
        onClearFilters={clearFilters}
        showMine={seesAll && ability.can('create', 'Batch')}
      />
      <BatchesTable query={query} list={batches} showOwner={seesAll} onQueryChange={setQuery} />
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
