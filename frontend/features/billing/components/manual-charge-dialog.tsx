import type { ManualChargeInput } from '../../../../shared/schemas/billing.ts';
import { ChoiceField, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { FormDialog } from '@/components/ui/form-dialog';
import { Checkbox } from '@/components/ui/input';
import { manualChargeInputSchema, useAddManualCharge, useBillableMembers } from '@/features/billing/api/manual-charges';
import { MoneyField } from '@/features/billing/components/money-field';

interface Props {
  open: boolean;
  period: string;
  currency: string;
  onClose: () => void;
}

const ChargeForm = ({ period, currency, onClose }: Omit<Props, 'open'>) => {
  const add = useAddManualCharge();
  const members = useBillableMembers();
  const { form, frame } = useApiForm<ManualChargeInput>(manualChargeInputSchema, {
    defaultValues: { memberId: '', period, description: '', reason: '', taxable: true },
    fields: ['memberId', 'period', 'description', 'reason', 'amountCents', 'taxable'],
  });
  return (
    <FormFrame {...frame((values) => add.mutateAsync(values).then(onClose), add.isPending)} onCancel={onClose} submitLabel="Add">
      <ChoiceField form={form} name="memberId" label="Member" autoFocus>
        <option value="">Pick a member…</option>
        {(members.data ?? []).map((m) => (
          <option key={m.id} value={m.id}>
            {m.name}
          </option>
        ))}
      </ChoiceField>
      <TextField
        form={form}
        name="period"
        label="Period"
        hint="Goes on the member's invoice for this month (straight onto it if that is still a draft)."
        type="month"
      />
      <TextField form={form} name="description" label="What the invoice says" autoComplete="off" />
      <TextField
        form={form}
        name="reason"
        label="Reason"
        hint="Why it is charged or credited; kept with the charge and shown as its source."
        autoComplete="off"
      />
      <MoneyField form={form} name="amountCents" label="Amount before tax" hint={`In ${currency}. A minus sign makes it a credit, e.g. -5.00.`} />
      <Checkbox label="Add tax at the period's rate" {...form.register('taxable')} />
    </FormFrame>
  );
};

export const ManualChargeDialog = ({ open, ...props }: Props) => (
  <FormDialog
    open={open}
    onClose={props.onClose}
    title="Add a charge or credit"
    description="For what no record covers: a part supplied, a fee waived, a correction."
  >
    <ChargeForm {...props} />
  </FormDialog>
);
