import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { MutationConfirmDialog } from '@/components/ui/dialog';
import { useNotice } from '@/components/ui/notice';
import { Spinner } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useInvoice } from '@/features/billing/api/get-invoice';
import { useIssueInvoice, useSendInvoice } from '@/features/billing/api/invoice-actions';
import { InvoiceDetailView } from '@/features/billing/components/invoice-detail-view';
import { RecordPaymentDialog, RefundDialog, VoidDialog } from '@/features/billing/components/money-dialogs';
import { RemindInvoiceButton } from '@/features/reminders/reminders';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { isApiProblem, problemMessage } from '@/lib/api-client';

type Open = null | 'payment' | 'refund' | 'void' | 'send' | 'issue';

/** One invoice for the treasurer: its lines and their sources, and what can be done with it. */
const InvoiceRoute = () => {
  const { invoiceId = '' } = useParams();
  const invoice = useInvoice(invoiceId);
  const ability = useAppAbility();
  const [open, setOpen] = useState<Open>(null);
  const notice = useNotice();
  const issue = useIssueInvoice(invoiceId);
  const send = useSendInvoice(invoiceId);
  useDocumentTitle(invoice.data?.number ?? 'Invoice');

  if (invoice.isPending) return <Spinner className="size-5 text-copper" />;
  if (invoice.isError) {
    if (isApiProblem(invoice.error) && invoice.error.status === 404) {
      return (
        <Alert tone="info" title="No such invoice">
          It may have been mistyped. <Link to={paths.billingInvoices}>Back to the invoices</Link>
        </Alert>
      );
    }
    return <Alert tone="error">{problemMessage(invoice.error)}</Alert>;
  }
  const inv = invoice.data;
  const can = {
    issue: inv.status === 'draft' && ability.can('update', 'Invoice'),
    send: inv.status !== 'void' && ability.can('send', 'Invoice'),
    pay: inv.status === 'issued' && inv.amountDueCents > 0 && ability.can('create', 'Payment'),
    refund: (inv.status === 'issued' || inv.status === 'paid') && inv.totalCents - inv.creditedCents > 0 && ability.can('create', 'CreditNote'),
    void: inv.status !== 'void' && ability.can('create', 'CreditNote'),
  };
  const actions = (
    <>
      {can.issue ? <Button onClick={() => setOpen('issue')}>Issue</Button> : null}
      {can.pay ? <Button onClick={() => setOpen('payment')}>Record payment</Button> : null}
      {can.send ? (
        <Button variant="secondary" onClick={() => setOpen('send')}>
          {inv.sentAt ? 'E-mail again' : 'E-mail to member'}
        </Button>
      ) : null}
      {can.refund ? (
        <Button variant="secondary" onClick={() => setOpen('refund')}>
          Credit or refund
        </Button>
      ) : null}
      {can.void ? (
        <Button variant="ghost" onClick={() => setOpen('void')}>
          Void
        </Button>
      ) : null}
    </>
  );
  return (
    <div className="flex max-w-5xl flex-col gap-4">
      <p className="text-sm">
        <Link to={paths.billingInvoices}>← Invoices</Link>
      </p>
      {inv.overdue && ability.can('remind', 'Invoice') ? (
        <RemindInvoiceButton invoiceId={inv.id} number={inv.number} lastRemindedAt={inv.lastRemindedAt} />
      ) : null}
      <InvoiceDetailView invoice={inv} actions={actions} />
      <RecordPaymentDialog invoice={inv} open={open === 'payment'} onClose={() => setOpen(null)} />
      <RefundDialog invoice={inv} open={open === 'refund'} onClose={() => setOpen(null)} />
      <VoidDialog invoice={inv} open={open === 'void'} onClose={() => setOpen(null)} />
      <MutationConfirmDialog
        open={open === 'issue'}
        title="Issue this invoice?"
        confirmLabel="Issue it"
        mutation={issue}
        onClose={() => setOpen(null)}
        onDone={({ invoice: issued }) => notice.show({ text: `Issued as ${issued.number}. ${issued.memberName} can see it now.` })}
      >
        It takes the next invoice number, is dated today and becomes visible to {inv.memberName}. From then on it never changes; corrections are credit notes.
      </MutationConfirmDialog>
      <MutationConfirmDialog
        open={open === 'send'}
        title={`E-mail ${inv.number ?? 'this invoice'} to ${inv.memberName}?`}
        confirmLabel="Send"
        mutation={send}
        onClose={() => setOpen(null)}
        onDone={(r) => notice.show({ text: `Queued for ${r.to}, with the PDF attached. It is retried if the mail server is busy.` })}
      >
        The PDF goes to {inv.memberEmail}, with how to pay.{inv.status === 'draft' ? ' Sending a draft issues it first.' : ''}
      </MutationConfirmDialog>
    </div>
  );
};

export default InvoiceRoute;
