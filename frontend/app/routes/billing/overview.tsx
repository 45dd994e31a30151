import type { ReactNode } from 'react';
import { Link, Navigate } from 'react-router-dom';
import { longDate, periodLabel } from '../../../../shared/billing/dates.ts';
import { ageingBucketLabels, ageingBuckets } from '../../../../shared/schemas/billing.ts';
import { figureHead, TableHead } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { ButtonLink } from '@/components/ui/button';
import { Spinner } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useAgeing, useBillingSummary } from '@/features/billing/api/billing-overview';
import { AgeingChart } from '@/features/billing/components/ageing-chart';
import { Money } from '@/features/billing/components/money';
import { OverpaymentsList } from '@/features/billing/components/overpayments-list';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

const Stat = ({ label, children, hint, tone }: { label: string; children: ReactNode; hint?: ReactNode; tone?: 'due' }) => (
  <div className={tone === 'due' ? 'rounded-md border border-due/40 bg-due-soft p-4' : 'rounded-md border border-line bg-surface p-4'}>
    <p className="text-xs font-semibold tracking-wide text-ink-muted uppercase">{label}</p>
    <p className="mt-1 text-2xl tabular-nums">{children}</p>
    {hint ? <p className="mt-1 text-sm text-ink-muted">{hint}</p> : null}
  </div>
);

/** The treasurer's home: what is unpaid, how old it is, and the last run. Anyone else goes to their own invoices. */
/** An amount in a figures column. */
const MoneyCell = ({ cents, currency }: { cents: number; currency: string }) => (
  <td className="py-1.5 text-right">
    <Money cents={cents} currency={currency} />
  </td>
);

const owedHead = ['Member', figureHead('Over 60 days'), figureHead('Open')];

const BillingOverviewRoute = () => {
  useDocumentTitle('Billing');
  const ability = useAppAbility();
  // Only whoever may read every invoice asks for the books' totals: a member's visit sends no request the server refuses.
  if (!canOnEvery(ability, 'read', 'Invoice')) return <Navigate to={paths.myInvoices} replace />;
  return <TreasurerOverview />;
};

const TreasurerOverview = () => {
  const summary = useBillingSummary();
  const ageing = useAgeing();
  if (summary.isPending || ageing.isPending) return <Spinner className="size-5 text-copper" />;
  if (summary.isError || ageing.isError) return <Alert tone="error">{problemMessage(summary.error ?? ageing.error)}</Alert>;
  const s = summary.data;
  const a = ageing.data;
  const c = s.currency;
  const suggestedDone = s.lastRun?.period === s.suggestedPeriod;
  return (
    <div className="flex flex-col gap-6">
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <Stat label="Unpaid" hint={`${s.unpaid.count} invoice${s.unpaid.count === 1 ? '' : 's'}`}>
          <Money cents={s.unpaid.totalCents} currency={c} />
        </Stat>
        <Stat label="Overdue" tone={s.overdue.count ? 'due' : undefined} hint={`${s.overdue.count} past their due date`}>
          <Money cents={s.overdue.totalCents} currency={c} />
        </Stat>
        <Stat label="Last run" hint={s.lastRun ? `${s.lastRun.invoiceCount} invoices · ${formatDateTime(s.lastRun.createdAt)}` : 'No run yet'}>
          {s.lastRun ? periodLabel(s.lastRun.period) : '—'}
        </Stat>
        <div className="flex flex-col justify-between gap-2 rounded-md border border-line bg-surface p-4">
          <p className="text-xs font-semibold tracking-wide text-ink-muted uppercase">Next</p>
          {suggestedDone ? (
            <p className="text-sm text-ink-muted">{periodLabel(s.suggestedPeriod)} is billed. The next run is due when the month ends.</p>
          ) : (
            <p className="text-sm">{periodLabel(s.suggestedPeriod)} has ended and can be billed.</p>
          )}
          <ButtonLink to={`${paths.billingRun}?period=${s.suggestedPeriod}`} variant={suggestedDone ? 'secondary' : 'primary'}>
            {suggestedDone ? 'Run a period' : `Preview ${periodLabel(s.suggestedPeriod)}`}
          </ButtonLink>
        </div>
      </div>
      {s.drafts ? (
        <Alert tone="info">
          {s.drafts} draft invoice{s.drafts === 1 ? ' is' : 's are'} waiting to be issued.{' '}
          <Link to={`${paths.billingInvoices}?status=draft`}>Review the drafts</Link>
        </Alert>
      ) : null}

      {s.overpayments.count ? <OverpaymentsList today={s.today} /> : null}

      <section aria-labelledby="ageing-title" className="grid gap-4 lg:grid-cols-[3fr_2fr]">
        <div className="rounded-md border border-line bg-surface p-4">
          <h2 id="ageing-title" className="text-base">
            Open amounts by age
          </h2>
          <p className="mb-3 text-sm text-ink-muted">Days since the invoice date, on {longDate(a.asOf)}.</p>
          <AgeingChart totals={a.totals} currency={a.currency} />
          <table className="mt-3 w-full text-sm">
            <caption className="sr-only">Open amounts by age</caption>
            <tbody>
              {ageingBuckets.map((b) => (
                <tr key={b} className="border-t border-line">
                  <th scope="row" className="py-1.5 text-left font-normal text-ink-muted">
                    {ageingBucketLabels[b]}
                  </th>
                  <MoneyCell cents={a.totals[b]} currency={a.currency} />
                </tr>
              ))}
              <tr className="border-t border-line-strong font-semibold">
                <th scope="row" className="py-1.5 text-left">
                  Open in all
                </th>
                <MoneyCell cents={a.totalCents} currency={a.currency} />
              </tr>
            </tbody>
          </table>
        </div>
        <div className="rounded-md border border-line bg-surface p-4">
          <h2 className="text-base">Who owes what</h2>
          <p className="mb-2 text-sm text-ink-muted">Largest first. Open a name for that member’s unpaid invoices.</p>
          {a.rows.length === 0 ? (
            <p className="text-sm text-ink-muted">Nothing is open. Every issued invoice is paid.</p>
          ) : (
            <div className="max-h-96 overflow-auto">
              <table className="w-full text-sm">
                <caption className="sr-only">Open amounts per member</caption>
                <TableHead cells={owedHead} className="sticky top-0 bg-surface text-left text-xs text-ink-muted uppercase" cellClassName="py-1" />
                <tbody>
                  {a.rows.map((r) => (
                    <tr key={r.memberId} className="border-t border-line">
                      <td className="py-1.5">
                        <Link to={`${paths.billingInvoices}?memberId=${r.memberId}&unpaid=true`}>{r.memberName}</Link>
                      </td>
                      <td className="py-1.5 text-right">
                        {r.buckets['61-90'] + r.buckets['90+'] ? (
                          <Money cents={r.buckets['61-90'] + r.buckets['90+']} currency={a.currency} className="text-due-strong" />
                        ) : (
                          <span className="text-ink-muted">—</span>
                        )}
                      </td>
                      <MoneyCell cents={r.totalCents} currency={a.currency} />
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </div>
      </section>
      <p className="text-sm">
        <Link to={`${paths.billingInvoices}?unpaid=true&sort=dueOn&order=asc`}>All unpaid invoices, oldest due first</Link>
        {s.lastRun ? (
          <>
            {' · '}
            <Link to={`${paths.billingInvoices}?period=${s.lastRun.period}`}>Invoices of {periodLabel(s.lastRun.period)}</Link>
          </>
        ) : null}
      </p>
    </div>
  );
};

export default BillingOverviewRoute;
