import { useEffect, useRef } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { useNotice } from '@/components/ui/notice';
import { Spinner } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useInvoice } from '@/features/billing/api/get-invoice';
import { useConfirmCheckout, useStartCheckout } from '@/features/billing/api/invoice-actions';
import { InvoiceDetailView } from '@/features/billing/components/invoice-detail-view';
import { money } from '@/features/billing/components/money';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { useSessionUser } from '@/lib/auth';

/** A member's invoice, with Pay online; the payment provider sends them back here. */
const MyInvoiceRoute = () => {
  const { invoiceId = '' } = useParams();
  const [params] = useSearchParams();
  const user = useSessionUser();
  const returned = params.get('checkout');
  const sessionId = params.get('session_id');
  const invoice = useInvoice(invoiceId, {
    // Just back from paying: look again until the payment shows, then stop.
    refetchInterval: (data) => (returned === 'success' && invoiceId && data?.status !== 'paid' ? 1500 : false),
  });
  const checkout = useStartCheckout(invoiceId);
  const confirm = useConfirmCheckout(invoiceId);
  const confirmed = useRef(false);
  const notice = useNotice();
  const thanked = useRef(false);
  useDocumentTitle(invoice.data?.number ?? 'Invoice');

  useEffect(() => {
    if (returned !== 'success' || !sessionId || confirmed.current) return;
    confirmed.current = true;
    confirm.mutate(sessionId);
  }, [returned, sessionId, confirm]);

  const paidNow = returned === 'success' && invoice.data?.status === 'paid';
  useEffect(() => {
    const inv = invoice.data;
    if (!paidNow || !inv || thanked.current) return;
    thanked.current = true;
    notice.show({
      title: 'Paid — thank you',
      text: `Your payment of ${money(inv.payments.at(-1)?.amountCents ?? inv.totalCents, inv.currency)} has been received and ${inv.number} is paid.`,
    });
  }, [paidNow, invoice.data, notice]);

  if (invoice.isPending) return <Spinner className="size-5 text-copper" />;
  if (invoice.isError) {
    if (isApiProblem(invoice.error) && invoice.error.status === 404) {
      return (
        <Alert tone="info" title="No such invoice">
          <Link to={paths.myInvoices}>Back to your invoices</Link>
        </Alert>
      );
    }
    return <Alert tone="error">{problemMessage(invoice.error)}</Alert>;
  }
  const inv = invoice.data;
  const payable = inv.status === 'issued' && inv.amountDueCents > 0 && inv.memberId === user?.id;
  return (
    <div className="flex max-w-5xl flex-col gap-4">
      <p className="text-sm">
        <Link to={paths.myInvoices}>← My invoices</Link>
      </p>
      {returned === 'success' && !paidNow ? (
        <Alert tone="info">
          <span className="inline-flex items-center gap-2">
            <Spinner className="size-4 text-copper" /> Waiting for the payment provider to confirm your payment…
          </span>
        </Alert>
      ) : null}
      {returned === 'cancelled' && inv.status === 'issued' ? (
        <Alert tone="info">You cancelled on the payment page; nothing was charged. You can pay whenever you are ready.</Alert>
      ) : null}
      {checkout.isError ? <Alert tone="error">{problemMessage(checkout.error)}</Alert> : null}
      <InvoiceDetailView
        own
        invoice={inv}
        actions={
          payable ? (
            <Button onClick={() => checkout.mutate()} pending={checkout.isPending || checkout.isSuccess}>
              Pay {money(inv.amountDueCents, inv.currency)} online
            </Button>
          ) : null
        }
      />
      {payable ? <p className="text-sm text-ink-muted">You can also pay by bank transfer, quoting {inv.number}; the PDF has the account details.</p> : null}
    </div>
  );
};

export default MyInvoiceRoute;
