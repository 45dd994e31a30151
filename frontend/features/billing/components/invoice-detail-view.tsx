import { useState, type ReactNode } from 'react';
import { longDate, periodLabel } from '../../../../shared/billing/dates.ts';
import { formatRate } from '../../../../shared/billing/money.ts';
import { paymentMethodLabels, type InvoiceDetail } from '../../../../shared/schemas/billing.ts';
import { EmptyRow, figureHead, TableHead } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { buttonClasses } from '@/components/ui/button';
import { invoicePdfUrl } from '@/features/billing/api/get-invoice';
import { InvoiceStatusBadge } from '@/features/billing/components/invoice-status-badge';
import { Money, money } from '@/features/billing/components/money';
import { cn } from '@/utils/cn';
import { formatDateTime } from '@/utils/format';

/** The unit price and the tax rate show on a wider screen; on a phone they sit under the charge. */
const chargeHead = [
  'Charge',
  figureHead('Quantity'),
  figureHead('Unit price', 'hidden sm:table-cell'),
  figureHead('Tax', 'hidden sm:table-cell'),
  figureHead('Amount'),
];

const quantity = (q: number, unit: string) =>
  unit === 'item' ? '1' : `${Number.isInteger(q) ? q : q.toFixed(3).replace(/0+$/, '')} ${unit}${q === 1 ? '' : 's'}`;

const Meta = ({ label, children }: { label: string; children: ReactNode }) => (
  <div className="flex flex-col">
    <dt className="text-xs text-ink-muted">{label}</dt>
    <dd className="font-medium">{children}</dd>
  </div>
);

const TotalRow = ({ label, children, strong = false }: { label: ReactNode; children: ReactNode; strong?: boolean }) => (
  <div className={cn('flex justify-between gap-6 py-1', strong && 'border-t border-line-strong pt-2 text-base font-semibold')}>
    <dt className={strong ? undefined : 'text-ink-muted'}>{label}</dt>
    <dd>{children}</dd>
  </div>
);

export interface InvoiceDetailViewProps {
  invoice: InvoiceDetail;
  /** Buttons for what the viewer may do (treasurer actions, or Pay online). */
  actions?: ReactNode;
  /** The member's own view: no internal details. */
  own?: boolean;
}

/** An invoice as a document: who, when, each line with the record it comes from, tax, totals, payments and credit notes. */
export const InvoiceDetailView = ({ invoice: inv, actions, own = false }: InvoiceDetailViewProps) => {
  const [showSources, setShowSources] = useState(true);
  const c = inv.currency;
  const byRate = new Map<number, { net: number; tax: number }>();
  for (const l of inv.lines) {
    const r = byRate.get(l.taxRateBp) ?? { net: 0, tax: 0 };
    r.net += l.amountCents;
    r.tax += l.taxCents;
    byRate.set(l.taxRateBp, r);
  }
  return (
    <article className="flex flex-col gap-5" aria-labelledby="invoice-title">
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div className="flex flex-col gap-1">
          <h1 id="invoice-title" className="flex flex-wrap items-center gap-2 text-2xl">
            <span className="tabular-nums">{inv.number ?? 'Draft invoice'}</span>
            <InvoiceStatusBadge status={inv.status} overdue={inv.overdue} partPaid={inv.paidCents > 0} />
          </h1>
          <p className="text-ink-muted">
            {own ? 'Your invoice' : inv.memberName} for {periodLabel(inv.period)}
            {own ? null : <span className="ml-1 text-sm">({inv.memberEmail})</span>}
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          {actions}
          <a className={buttonClasses('secondary')} href={invoicePdfUrl(inv.id)} target="_blank" rel="noopener">
            PDF
          </a>
        </div>
      </header>

      {inv.status === 'void' ? (
        <Alert tone="info" title="Void">
          {inv.voidReason} {inv.creditNotes.some((n) => n.kind === 'void') ? 'A credit note replaces it (below).' : null}
        </Alert>
      ) : null}
      {inv.status === 'draft' ? <Alert tone="info">A draft: not numbered and not visible to the member until it is issued.</Alert> : null}

      <dl className="grid grid-cols-2 gap-3 rounded-md border border-line bg-surface p-4 text-sm sm:grid-cols-4">
        <Meta label="Invoice date">{inv.issuedOn ? longDate(inv.issuedOn) : '—'}</Meta>
        <Meta label="Due">{inv.dueOn ? longDate(inv.dueOn) : '—'}</Meta>
        <Meta label="Total">
          <Money cents={inv.totalCents} currency={c} />
        </Meta>
        <Meta label={inv.amountDueCents < 0 ? 'In credit' : 'Still to pay'}>
          {inv.status === 'draft' ? '—' : <Money cents={Math.abs(inv.amountDueCents)} currency={c} className={inv.overdue ? 'text-due-strong' : undefined} />}
        </Meta>
      </dl>

      <section aria-labelledby="lines-title" className="flex flex-col gap-2">
        <div className="flex items-baseline justify-between gap-3">
          <h2 id="lines-title" className="text-base">
            Charges
          </h2>
          <label className="flex items-center gap-2 text-sm text-ink-muted">
            <input type="checkbox" className="size-4 accent-copper" checked={showSources} onChange={(e) => setShowSources(e.target.checked)} />
            Show where each charge comes from
          </label>
        </div>
        <div className="overflow-x-auto rounded-md border border-line bg-surface">
          <table className="w-full text-sm">
            <caption className="sr-only">Charges on this invoice</caption>
            <TableHead cells={chargeHead} className="bg-ground-deep text-left text-xs tracking-wide text-ink-muted uppercase" cellClassName="px-3 py-2" />
            <tbody>
              {inv.lines.length === 0 ? (
                <EmptyRow colSpan={5} className="py-6">
                  No charges.
                </EmptyRow>
              ) : (
                inv.lines.map((l) => (
                  <tr key={l.id} className="border-t border-line align-top">
                    <td className="px-3 py-2">
                      <span className="text-ink">{l.description}</span>
                      {showSources ? <span className="block text-xs text-ink-muted">{l.sourceLabel}</span> : null}
                      <span className="block text-xs text-ink-muted sm:hidden">
                        at <Money cents={l.unitPriceCents} currency={c} />, tax {formatRate(l.taxRateBp)}
                      </span>
                    </td>
                    <td className="px-3 py-2 text-right whitespace-nowrap tabular-nums">{quantity(l.quantity, l.unit)}</td>
                    <td className="hidden px-3 py-2 text-right sm:table-cell">
                      <Money cents={l.unitPriceCents} currency={c} />
                    </td>
                    <td className="hidden px-3 py-2 text-right whitespace-nowrap text-ink-muted tabular-nums sm:table-cell">{formatRate(l.taxRateBp)}</td>
                    <td className="px-3 py-2 text-right">
                      <Money cents={l.amountCents} currency={c} muteNegative />
                    </td>
                  </tr>
                ))
              )}
            </tbody>
          </table>
        </div>
        <dl className="ml-auto w-full max-w-sm text-sm">
          <TotalRow label="Subtotal">
            <Money cents={inv.subtotalCents} currency={c} />
          </TotalRow>
          {[...byRate.entries()].map(([rate, v]) => (
            <TotalRow key={rate} label={`Tax at ${formatRate(rate)} on ${money(v.net, c)}`}>
              <Money cents={v.tax} currency={c} />
            </TotalRow>
          ))}
          <TotalRow label="Total" strong>
            <Money cents={inv.totalCents} currency={c} />
          </TotalRow>
          {inv.creditedCents ? (
            <TotalRow label="Credited">
              <Money cents={-inv.creditedCents} currency={c} />
            </TotalRow>
          ) : null}
          {inv.paidCents ? (
            <TotalRow label="Paid">
              <Money cents={-inv.paidCents} currency={c} />
            </TotalRow>
          ) : null}
          {inv.status !== 'draft' ? (
            <TotalRow label={inv.amountDueCents < 0 ? 'In credit' : 'Still to pay'} strong>
              <Money cents={Math.abs(inv.amountDueCents)} currency={c} />
            </TotalRow>
          ) : null}
        </dl>
        <p className="text-xs text-ink-muted">
          Each line and its tax are rounded to the cent on their own, halves away from zero; the tax is the sum of the lines’ tax.
        </p>
      </section>

      {inv.payments.length ? (
        <section aria-labelledby="payments-title" className="flex flex-col gap-2">
          <h2 id="payments-title" className="text-base">
            Payments
          </h2>
          <ul className="divide-y divide-line rounded-md border border-line bg-surface text-sm">
            {inv.payments.map((p) => (
              <li key={p.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2">
                <span>
                  {longDate(p.receivedOn)} · {paymentMethodLabels[p.method]}
                  {p.amountCents < 0 ? (
                    <Badge tone="muted" className="ml-2">
                      Paid back
                    </Badge>
                  ) : null}
                  {p.overpaidCents > 0 ? (
                    <Badge tone={p.overpaymentRefundedOn ? 'muted' : 'due'} className="ml-2">
                      {p.overpaymentRefundedOn ? 'Overpayment refunded' : 'Overpayment'}
                    </Badge>
                  ) : null}
                  {p.reference ? <span className="ml-2 text-ink-muted">{p.reference}</span> : null}
                  {p.note ? <span className="block text-xs text-ink-muted">{p.note}</span> : null}
                  {p.overpaidCents > 0 ? (
                    <span className="block text-xs" data-testid="overpayment">
                      {money(p.overpaidCents, p.currency)} of it was more than was due:{' '}
                      {p.overpaymentRefundedOn ? `paid back on ${longDate(p.overpaymentRefundedOn)}.` : 'it is owed back to the member.'}
                    </span>
                  ) : null}
                </span>
                <Money cents={p.amountCents} currency={p.currency} className="font-medium" />
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      {inv.creditNotes.length ? (
        <section aria-labelledby="credit-notes-title" className="flex flex-col gap-2">
          <h2 id="credit-notes-title" className="text-base">
            Credit notes
          </h2>
          <ul className="flex flex-col gap-2">
            {inv.creditNotes.map((n) => (
              <li key={n.id} className="rounded-md border border-line bg-surface p-3 text-sm">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <span className="font-medium tabular-nums">
                    {n.number}{' '}
                    <span className="font-normal text-ink-muted">
                      of {longDate(n.issuedOn)} · {n.kind === 'void' ? 'replaces this invoice' : 'credit or refund'}
                    </span>
                  </span>
                  <Money cents={n.totalCents} currency={n.currency} className="font-medium" />
                </div>
                <p className="mt-1 text-ink-muted">{n.reason}</p>
                <p className="mt-1">
                  <a href={`/api/credit-notes/${n.id}/pdf`} target="_blank" rel="noopener">
                    Credit note PDF
                  </a>
                </p>
                <p className="mt-1 text-xs text-ink-muted">
                  <Money cents={n.subtotalCents} currency={n.currency} /> + <Money cents={n.taxCents} currency={n.currency} /> tax, in {n.lines.length} line
                  {n.lines.length === 1 ? '' : 's'}
                </p>
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      {!own && inv.sentAt ? <p className="text-xs text-ink-muted">Last e-mailed {formatDateTime(inv.sentAt)}.</p> : null}
    </article>
  );
};
