import { useState } from 'react';
import { todayIn } from '../../../../shared/billing/dates.ts';
import { splitGross } from '../../../../shared/billing/money.ts';
import {
  manualPaymentMethods,
  paymentMethodLabels,
  type InvoiceDetail,
  type PaymentInput,
  type RefundInput,
  type VoidInvoiceInput,
} from '../../../../shared/schemas/billing.ts';
import { ChoiceField, OptionList, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { FieldSet } from '@/components/ui/field';
import { FormDialog } from '@/components/ui/form-dialog';
import { Radio } from '@/components/ui/input';
import { useNotice } from '@/components/ui/notice';
import {
  paymentInputSchema,
  refundInputSchema,
  useRecordPayment,
  useRefundInvoice,
  useVoidInvoice,
  voidInvoiceSchema,
} from '@/features/billing/api/invoice-actions';
import { money } from '@/features/billing/components/money';
import { MoneyField } from '@/features/billing/components/money-field';
import { centsToInput } from '@/features/billing/utils/money-input';
import { coopTimeZone } from '@/utils/format';

interface DialogBaseProps {
  invoice: InvoiceDetail;
  open: boolean;
  onClose: () => void;
}

const today = () => todayIn(coopTimeZone(), new Date());
const moneyHint = (currency: string) => `In ${currency}, e.g. 12.50`;

const PaymentForm = ({ invoice, onClose }: Omit<DialogBaseProps, 'open'>) => {
  const record = useRecordPayment(invoice.id);
  const notice = useNotice();
  const { form, frame } = useApiForm<PaymentInput>(paymentInputSchema, {
    defaultValues: { method: 'bank_transfer', receivedOn: today(), reference: '', note: '' },
    fields: ['amountCents', 'method', 'receivedOn', 'reference', 'note'],
  });
  const send = async (values: PaymentInput) => {
    const { payment, invoice: after } = await record.mutateAsync(values);
    const paid = `${money(payment.amountCents, after.currency)} from ${after.memberName}`;
    notice.show({
      title: 'Payment recorded',
      text:
        after.amountDueCents > 0
          ? `${paid} on ${after.number}; ${money(after.amountDueCents, after.currency)} is still due.`
          : `${paid}; ${after.number} is paid.`,
    });
    onClose();
  };
  return (
    <FormFrame {...frame(send, record.isPending)} onCancel={onClose} submitLabel="Record payment">
      <p className="text-sm text-ink-muted">Still to pay: {money(invoice.amountDueCents, invoice.currency)}. A smaller amount is recorded as a part payment.</p>
      <MoneyField
        form={form}
        name="amountCents"
        label="Amount received"
        hint={moneyHint(invoice.currency)}
        defaultValue={centsToInput(invoice.amountDueCents)}
        autoFocus
      />
      <ChoiceField form={form} name="method" label="How">
        <OptionList values={manualPaymentMethods} labels={paymentMethodLabels} />
      </ChoiceField>
      <TextField form={form} name="receivedOn" label="Received on" type="date" />
      <TextField form={form} name="reference" label="Reference" hint="The bank's reference, or the receipt number for cash." autoComplete="off" />
    </FormFrame>
  );
};

export const RecordPaymentDialog = ({ invoice, open, onClose }: DialogBaseProps) => (
  <FormDialog
    open={open}
    onClose={onClose}
    title={`Record a payment on ${invoice.number}`}
    description={`From ${invoice.memberName}, by bank transfer or cash.`}
  >
    <PaymentForm invoice={invoice} onClose={onClose} />
  </FormDialog>
);

const invoiceRate = (invoice: InvoiceDetail) => {
  const rates = [...new Set(invoice.lines.map((l) => l.taxRateBp))];
  return rates.length === 1 ? rates[0]! : null;
};

const RefundForm = ({ invoice, onClose }: Omit<DialogBaseProps, 'open'>) => {
  const refund = useRefundInvoice(invoice.id);
  const notice = useNotice();
  const creditable = invoice.totalCents - invoice.creditedCents;
  const { form, frame } = useApiForm<RefundInput>(refundInputSchema, {
    defaultValues: { reason: '', refundMethod: null },
    fields: ['amountCents', 'reason', 'refundMethod'],
  });
  // Nothing is recorded as paid back unless the treasurer says it was, and how.
  const [paidBack, setPaidBack] = useState<'no' | (typeof manualPaymentMethods)[number]>('no');
  const amount = form.watch('amountCents');
  const rate = invoiceRate(invoice);
  const split = Number.isFinite(amount) && amount > 0 && rate !== null ? splitGross(amount, rate) : null;
  const send = async (values: RefundInput) => {
    const { creditNoteId, invoice: after } = await refund.mutateAsync({ ...values, refundMethod: paidBack === 'no' ? null : paidBack });
    const note = after.creditNotes.find((n) => n.id === creditNoteId);
    notice.show({
      title: `Credit note ${note?.number ?? ''} issued`.replace('  ', ' '),
      text: `${money(values.amountCents, after.currency)} credited on ${after.number}${paidBack === 'no' ? '' : ', recorded as paid back'}. Its PDF is listed under Credit notes.`,
    });
    onClose();
  };
  return (
    <FormFrame {...frame(send, refund.isPending)} onCancel={onClose} submitLabel="Issue the credit note" submitDisabled={rate === null}>
      {rate === null ? <Alert tone="info">This invoice has lines at several tax rates; void it instead of crediting part of it.</Alert> : null}
      <MoneyField
        form={form}
        name="amountCents"
        label="Amount to credit, tax included"
        hint={
          split
            ? `Credit note: ${money(split.netCents, invoice.currency)} + ${money(split.taxCents, invoice.currency)} tax. At most ${money(creditable, invoice.currency)}.`
            : `At most ${money(creditable, invoice.currency)}.`
        }
        autoFocus
      />
      <TextField form={form} name="reason" label="Reason" hint="Shown on the credit note." autoComplete="off" />
      {invoice.paidCents > 0 ? (
        <FieldSet
          legend="Was money paid back to the member?"
          hint={`${money(invoice.paidCents, invoice.currency)} has been paid on this invoice. Record a refund only once the money has gone back.`}
          error={form.formState.errors.refundMethod?.message}
        >
          <Radio
            name="paidBack"
            value="no"
            label="No, a credit only"
            description="It reduces what is owed; anything paid beyond that stays as credit on the member’s account."
            checked={paidBack === 'no'}
            onChange={() => setPaidBack('no')}
          />
          {manualPaymentMethods.map((m) => (
            <Radio
              key={m}
              name="paidBack"
              value={m}
              label={m === 'cash' ? 'Yes, paid back in cash today' : `Yes, paid back by ${paymentMethodLabels[m].toLowerCase()} today`}
              checked={paidBack === m}
              onChange={() => setPaidBack(m)}
            />
          ))}
        </FieldSet>
      ) : (
        <p className="text-sm text-ink-muted">Nothing has been paid on this invoice, so the credit reduces what is owed.</p>
      )}
    </FormFrame>
  );
};

export const RefundDialog = ({ invoice, open, onClose }: DialogBaseProps) => (
  <FormDialog
    open={open}
    onClose={onClose}
    title={`Credit or refund part of ${invoice.number}`}
    description="A credit note documents it; the invoice itself never changes."
  >
    <RefundForm invoice={invoice} onClose={onClose} />
  </FormDialog>
);

const VoidForm = ({ invoice, onClose }: Omit<DialogBaseProps, 'open'>) => {
  const voidIt = useVoidInvoice(invoice.id);
  const notice = useNotice();
  const { form, frame } = useApiForm<VoidInvoiceInput>(voidInvoiceSchema, {
    defaultValues: { reason: '', refundMethod: null },
    fields: ['reason', 'refundMethod'],
  });
  const send = async (values: VoidInvoiceInput) => {
    const { creditNoteId, invoice: after } = await voidIt.mutateAsync(values);
    const note = after.creditNotes.find((n) => n.id === creditNoteId);
    notice.show({
      title: creditNoteId ? `${after.number} voided` : 'Draft voided',
      text: creditNoteId ? `Credit note ${note?.number ?? ''} replaces it; its PDF is listed under Credit notes.` : 'The draft is void; nothing was issued.',
    });
    onClose();
  };
  const draft = invoice.status === 'draft';
  const submitLabel = draft ? 'Void the draft' : 'Void and issue the credit note';
  return (
    <FormFrame {...frame(send, voidIt.isPending)} onCancel={onClose} cancelLabel="Keep the invoice" submitLabel={submitLabel}>
      <p className="text-sm">
        {draft
          ? 'This draft was never issued, so no credit note is needed. Its charges stay billed to this period; correct them with a manual charge or credit on a later period.'
          : `A credit note for ${money(invoice.totalCents - invoice.creditedCents, invoice.currency)} replaces ${invoice.number}. The invoice stays in the books, marked void. Bill any fair charges again as a manual charge on a later period.`}
      </p>
      <TextField form={form} name="reason" label="Reason" autoComplete="off" autoFocus />
      {invoice.paidCents > 0 ? (
        <ChoiceField
          form={form}
          name="refundMethod"
          label="What was paid"
          hint={`${money(invoice.paidCents, invoice.currency)} has been paid.`}
          options={{ setValueAs: (v: string | null) => (v ? v : null) }}
        >
          <option value="">Keep it as credit on the member’s account</option>
          <OptionList values={manualPaymentMethods} labels={(m) => `Pay it back by ${paymentMethodLabels[m].toLowerCase()}`} />
        </ChoiceField>
      ) : null}
    </FormFrame>
  );
};

export const VoidDialog = ({ invoice, open, onClose }: DialogBaseProps) => (
  <FormDialog open={open} onClose={onClose} title={`Void ${invoice.number ?? 'this draft'}`}>
    <VoidForm invoice={invoice} onClose={onClose} />
  </FormDialog>
);
