import { Navigate } from 'react-router-dom';
import { paths } from '@/config/paths';
import { invoiceListQuery, useInvoices } from '@/features/billing/api/get-invoices';
import { InvoicesTable, InvoicesToolbar } from '@/features/billing/components/invoices-table';
import { RemindAllOverdueInvoices } from '@/features/reminders/reminders';
import { useListQuery } from '@/components/list-kit';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';

/** Every invoice: sorted, filtered and paged on the server. */
const InvoicesRoute = () => {
  useDocumentTitle('Invoices');
  const ability = useAppAbility();
  const { query, setQuery, hasFilters, clearFilters } = useListQuery(invoiceListQuery);
  const invoices = useInvoices(query);
  if (!canOnEvery(ability, 'read', 'Invoice')) return <Navigate to={paths.myInvoices} replace />;
  return (
    <div className="flex flex-col gap-4">
      <InvoicesToolbar query={query} onQueryChange={setQuery} hasFilters={hasFilters} onClearFilters={clearFilters} />
      {ability.can('remind', 'Invoice') ? <RemindAllOverdueInvoices /> : null}
      <InvoicesTable query={query} list={invoices} hasFilters={hasFilters} onQueryChange={setQuery} />
    </div>
  );
};

export default InvoicesRoute;
