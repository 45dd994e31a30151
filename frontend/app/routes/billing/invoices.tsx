import { Navigate } from 'react-router-dom';
import { paths } from '@/config/paths';
import { useInvoices } from '@/features/billing/api/get-invoices';
import { InvoicesTable, InvoicesToolbar } from '@/features/billing/components/invoices-table';
import { useInvoicesSearchParams } from '@/features/billing/hooks/use-invoices-search-params';
import { RemindAllOverdueInvoices } from '@/features/reminders/reminders';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';

/** Every invoice: sorted, filtered and paged on the server. */
const InvoicesRoute = () => {
  useDocumentTitle('Invoices');
  const ability = useAppAbility();
  const { query, setQuery, hasFilters } = useInvoicesSearchParams();
  const invoices = useInvoices(query);
  if (!canOnEvery(ability, 'read', 'Invoice')) return <Navigate to={paths.myInvoices} replace />;
  return (
    <div className="flex flex-col gap-4">
      <InvoicesToolbar query={query} onQueryChange={setQuery} hasFilters={hasFilters} />
      {ability.can('remind', 'Invoice') ? <RemindAllOverdueInvoices /> : null}
      <InvoicesTable
        query={query}
        data={invoices.data}
        isLoading={invoices.isPending}
        error={invoices.error}
        onRetry={() => void invoices.refetch()}
        isFetching={invoices.isFetching}
        isPlaceholderData={invoices.isPlaceholderData}
        hasFilters={hasFilters}
        onQueryChange={setQuery}
      />
    </div>
  );
};

export default InvoicesRoute;
