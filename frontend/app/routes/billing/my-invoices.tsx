import { myInvoiceHref } from '@/config/paths';
import { useMyBalance } from '@/features/billing/api/billing-overview';
import { invoiceListQuery, useInvoices } from '@/features/billing/api/get-invoices';
import { InvoicesTable, InvoicesToolbar } from '@/features/billing/components/invoices-table';
import { Money } from '@/features/billing/components/money';
import { useListQuery } from '@/components/list-kit';
import { useDocumentTitle } from '@/hooks/use-document-title';

/** A member's own invoices and what they owe. */
const MyInvoicesRoute = () => {
  useDocumentTitle('My invoices');
  const { query, setQuery, hasFilters, clearFilters } = useListQuery(invoiceListQuery);
  const invoices = useInvoices(query);
  const balance = useMyBalance();
  const b = balance.data;
  return (
    <div className="flex flex-col gap-4">
      {b ? (
        <section
          aria-label="Your balance"
          className={b.overdueInvoices ? 'rounded-md border border-due/40 bg-due-soft p-4' : 'rounded-md border border-line bg-surface p-4'}
        >
          <p className="text-xs font-semibold tracking-wide text-ink-muted uppercase">{b.balanceCents < 0 ? 'In credit' : 'You owe'}</p>
          <p className="mt-1 text-3xl" data-testid="balance">
            <Money cents={Math.abs(b.balanceCents)} currency={b.currency} />
          </p>
          <p className="mt-1 text-sm text-ink-muted">
            {b.openInvoices === 0
              ? 'Nothing is waiting to be paid. Thank you.'
              : `${b.openInvoices} invoice${b.openInvoices === 1 ? '' : 's'} to pay${b.overdueInvoices ? `, ${b.overdueInvoices} past the due date` : ''}. Open one to pay it online.`}
          </p>
        </section>
      ) : null}
      <InvoicesToolbar query={query} onQueryChange={setQuery} hasFilters={hasFilters} onClearFilters={clearFilters} own />
      <InvoicesTable own query={query} list={invoices} hasFilters={hasFilters} onQueryChange={setQuery} hrefFor={(i) => myInvoiceHref(i.id)} />
    </div>
  );
};

export default MyInvoicesRoute;
