import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getAgeingQueryOptions, getBalanceQueryOptions, getSummaryQueryOptions } from '@/features/billing/api/billing-overview';
import { getInvoiceQueryOptions } from '@/features/billing/api/get-invoice';
import { getInvoicesQueryOptions, invoiceListQuery } from '@/features/billing/api/get-invoices';
import { canOnEvery } from '@/lib/ability';

/** The books' totals, for whoever may read every invoice (anyone else is sent to their own invoices). */
export const billingOverviewPlan: PrefetchPlan = ({ ability }) =>
  canOnEvery(ability, 'read', 'Invoice') ? [getSummaryQueryOptions(), getAgeingQueryOptions()] : [];

/** The invoice list (every invoice, or one's own), as its URL says; the section is shown to whoever may read invoices. */
export const invoicesPlan: PrefetchPlan = ({ search, ability }) => [ability.can('read', 'Invoice') && getInvoicesQueryOptions(invoiceListQuery.parse(search))];

/** One's own invoices and balance. */
export const myInvoicesPlan: PrefetchPlan = (args) => [...invoicesPlan(args), args.ability.can('read', 'Invoice') && getBalanceQueryOptions()];

/** One invoice. */
export const invoicePlan: PrefetchPlan = ({ params }) => [Boolean(params.invoiceId) && getInvoiceQueryOptions(params.invoiceId ?? '')];

export const billingOverviewLoader = prefetchLoader(billingOverviewPlan);
export const invoicesLoader = prefetchLoader(invoicesPlan);
export const myInvoicesLoader = prefetchLoader(myInvoicesPlan);
export const invoiceLoader = prefetchLoader(invoicePlan);
