import { Link } from 'react-router-dom';
import { longDate } from '../../../../shared/billing/dates.ts';
import { figureHead, hiddenHead, TableHead } from '@/components/list-kit';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { invoiceHref } from '@/config/paths';
import { useMarkOverpaymentRefunded, useOpenOverpayments } from '@/features/billing/api/overpayments';
import { Money } from '@/features/billing/components/money';
import { problemMessage } from '@/lib/api-client';

/**
 * Online payments that brought more than their invoice owed (a second checkout paid, or one paid as it
 * was being replaced): the excess is the member's, to pay back. "Refunded" records that it was, on `today`.
 */
const overpaymentHead = ['Member', 'Invoice', 'Received', figureHead('To refund'), hiddenHead('Action')];

export const OverpaymentsList = ({ today }: { today: string }) => {
  const list = useOpenOverpayments();
  const mark = useMarkOverpaymentRefunded();
  if (list.isPending) return null;
  if (list.isError) return <Alert tone="error">{problemMessage(list.error)}</Alert>;
  if (list.data.items.length === 0) return null;
  return (
    <section aria-labelledby="overpayments-title" className="rounded-md border border-due/40 bg-due-soft p-4">
      <h2 id="overpayments-title" className="text-base">
        Overpayments to refund
      </h2>
      <p className="mb-2 text-sm text-ink-muted">Paid online beyond what the invoice owed. Pay the excess back to the member, then mark it refunded.</p>
      {mark.isError ? <Alert tone="error">{problemMessage(mark.error)}</Alert> : null}
      <table className="w-full text-sm">
        <caption className="sr-only">Overpayments still owed back to members</caption>
        <TableHead cells={overpaymentHead} className="text-left text-xs text-ink-muted uppercase" cellClassName="py-1" />
        <tbody>
          {list.data.items.map((o) => (
            <tr key={o.paymentId} className="border-t border-line">
              <td className="py-1.5">{o.memberName}</td>
              <td className="py-1.5">
                <Link to={invoiceHref(o.invoiceId)}>{o.invoiceNumber ?? 'Invoice'}</Link>
              </td>
              <td className="py-1.5">{longDate(o.receivedOn)}</td>
              <td className="py-1.5 text-right">
                <Money cents={o.overpaidCents} currency={o.currency} />
              </td>
              <td className="py-1.5 text-right">
                <Button
                  size="sm"
                  variant="secondary"
                  pending={mark.isPending && mark.variables?.paymentId === o.paymentId}
                  onClick={() => mark.mutate({ paymentId: o.paymentId, refundedOn: today })}
                >
                  Refunded
                </Button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {list.data.total > list.data.items.length ? (
        <p className="mt-2 text-sm text-ink-muted">
          The {list.data.items.length} newest of {list.data.total}; mark these refunded to see the rest.
        </p>
      ) : null}
    </section>
  );
};
